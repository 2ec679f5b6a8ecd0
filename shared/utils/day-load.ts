// A technician-day's load against capacity: visit durations plus the driving between the day's
// stops (shortest order from the technician's home base, as the route helpers estimate it).
// Pure: no I/O.
import { orderStops, routeLegs, type RouteCoordinate } from './route-order'

export interface DayLoadStop {
  id: string
  durationMinutes: number
  /** The site's coordinates; a stop without them counts its duration but no driving. */
  lat: number | null
  lon: number | null
}

export interface DayLoad {
  visitMinutes: number
  drivingMinutes: number
  totalMinutes: number
  capacityMinutes: number
  over: boolean
  /** Stops left out of the driving estimate for want of coordinates. */
  stopsWithoutPlace: number
}

/**
 * Without a home base the route starts at the first located stop (driving between stops only).
 */
export function dayLoad(stops: readonly DayLoadStop[], home: RouteCoordinate | null, capacityMinutes: number): DayLoad {
  const visitMinutes = stops.reduce((sum, s) => sum + s.durationMinutes, 0)
  const located = stops.flatMap(s => (s.lat != null && s.lon != null ? [{ id: s.id, lat: s.lat, lon: s.lon }] : []))
  let drivingMinutes = 0
  if (located.length) {
    const start = home ?? located[0]!
    const byId = new Map(located.map(s => [s.id, s]))
    drivingMinutes = routeLegs(start, orderStops(start, located).map(id => byId.get(id)!)).totalMinutes
  }
  const totalMinutes = visitMinutes + drivingMinutes
  return { visitMinutes, drivingMinutes, totalMinutes, capacityMinutes, over: totalMinutes > capacityMinutes, stopsWithoutPlace: stops.length - located.length }
}

/** "5.5 h of 7 h (1.2 h driving)", or short: "5.5/7 h". */
export function dayLoadWords(load: DayLoad, short = false): string {
  const h = (m: number) => Math.round(m / 6) / 10
  return short
    ? `${h(load.totalMinutes)}/${h(load.capacityMinutes)} h`
    : `${h(load.totalMinutes)} h of ${h(load.capacityMinutes)} h (${h(load.drivingMinutes)} h driving)`
}

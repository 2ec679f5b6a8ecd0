// One technician's day while the plan is built: its stops in a driving order kept by cheapest
// insertion, so the tracked driving is always the length of a real order, and the final check of
// each day's route with route-order.ts.
import { greatCircleKm, orderStops, routeLegs, routeLengthKm, type RouteCoordinate } from '../route-order'

export interface DayRoute {
  /** Visit indexes in driving order. */
  stops: number[]
  /** legKm[i]: great-circle km from the previous point (home for i = 0) to stops[i]. */
  legKm: number[]
  /** Great-circle km of the open route home → stops. */
  km: number
  visitMinutes: number
}

export function emptyDayRoute(): DayRoute {
  return { stops: [], legKm: [], km: 0, visitMinutes: 0 }
}

export interface Insertion {
  /** Extra great-circle km. */
  deltaKm: number
  /** Insert before stops[position] (position = stops.length: at the end). */
  position: number
}

/** The cheapest place to add point `v` to the route. O(stops). */
export function cheapestInsertion(route: DayRoute, home: RouteCoordinate, points: readonly RouteCoordinate[], v: number): Insertion {
  const p = points[v]!
  const stops = route.stops
  if (stops.length === 0) return { deltaKm: greatCircleKm(home, p), position: 0 }
  let prevKm = greatCircleKm(home, p)
  let best = Infinity
  let position = 0
  for (let i = 0; i < stops.length; i++) {
    const nextKm = greatCircleKm(p, points[stops[i]!]!)
    const delta = prevKm + nextKm - route.legKm[i]!
    if (delta < best) {
      best = delta
      position = i
    }
    prevKm = nextKm
  }
  // At the end: only the leg from the last stop.
  if (prevKm < best) {
    best = prevKm
    position = stops.length
  }
  return { deltaKm: Math.max(0, best), position }
}

export function insertIntoDayRoute(route: DayRoute, home: RouteCoordinate, points: readonly RouteCoordinate[], v: number, at: Insertion, minutes: number): void {
  const p = points[v]!
  const prev = at.position === 0 ? home : points[route.stops[at.position - 1]!]!
  const inKm = greatCircleKm(prev, p)
  if (at.position < route.stops.length) {
    const next = points[route.stops[at.position]!]!
    route.legKm[at.position] = greatCircleKm(p, next)
  }
  route.stops.splice(at.position, 0, v)
  route.legKm.splice(at.position, 0, inKm)
  route.km = route.legKm.reduce((a, b) => a + b, 0)
  route.visitMinutes += minutes
}

/** Takes stops[k] out of the route. */
export function removeFromDayRoute(route: DayRoute, home: RouteCoordinate, points: readonly RouteCoordinate[], k: number, minutes: number): void {
  if (k + 1 < route.stops.length) {
    const prev = k === 0 ? home : points[route.stops[k - 1]!]!
    route.legKm[k + 1] = greatCircleKm(prev, points[route.stops[k + 1]!]!)
  }
  route.stops.splice(k, 1)
  route.legKm.splice(k, 1)
  route.km = route.legKm.reduce((a, b) => a + b, 0)
  route.visitMinutes -= minutes
}

export interface CheckedRoute {
  /** Visit indexes in the driving order used. */
  order: number[]
  /** Road km (× detourFactor) and driving minutes at speedKmh, from routeLegs. */
  km: number
  driveMinutes: number
}

/**
 * The day's true route: route-order.ts's orderStops, or the insertion order when that is shorter
 * (orderStops is a local optimum above 10 stops), measured with routeLegs.
 */
export function checkDayRoute(route: DayRoute, home: RouteCoordinate, points: readonly RouteCoordinate[], ids: readonly string[], opts: { speedKmh: number, detourFactor: number }): CheckedRoute {
  const stops = route.stops.map(i => ({ id: ids[i]!, lat: points[i]!.lat, lon: points[i]!.lon }))
  const byId = new Map(route.stops.map((v, k) => [ids[v]!, k]))
  const ordered = orderStops(home, stops).map(id => stops[byId.get(id)!]!)
  const use = routeLengthKm(home, ordered) <= routeLengthKm(home, stops) ? ordered : stops
  const legs = routeLegs(home, use, opts)
  return { order: use.map(s => route.stops[byId.get(s.id)!]!), km: legs.totalKm, driveMinutes: legs.totalMinutes }
}

import { describe, expect, it } from 'vitest'
import { dayLoad, dayLoadWords } from '../../shared/utils/day-load'
import { ROUTE_ASSUMPTIONS } from '../../shared/utils/route-order'

// One degree of latitude is 111.195 km on the mean-radius sphere (6371.0088 km × π / 180):
// computed from the route helpers' stated radius. Driving = km × detour 1.3 at 40 km/h
// (the route helpers' defaults: common practice, no source).
const KM_PER_DEGREE = 6371.0088 * Math.PI / 180
const drive = (km: number) => (km * ROUTE_ASSUMPTIONS.detourFactor / ROUTE_ASSUMPTIONS.speedKmh) * 60

describe('a technician-day against capacity', () => {
  it('adds the driving between the stops to the visit durations', () => {
    const home = { lat: 44, lon: -91 }
    const load = dayLoad([
      { id: 'b', durationMinutes: 60, lat: 44.2, lon: -91 },
      { id: 'a', durationMinutes: 90, lat: 44.1, lon: -91 },
    ], home, 420)
    expect(load.visitMinutes).toBe(150)
    // home → a (0.1°) → b (0.1°): 0.2° in all, in the shorter order.
    expect(load.drivingMinutes).toBeCloseTo(drive(0.2 * KM_PER_DEGREE), 6)
    expect(load.totalMinutes).toBeCloseTo(150 + drive(0.2 * KM_PER_DEGREE), 6)
    expect(load.over).toBe(false)
  })
  it('is over capacity when driving tips it over, though the visits alone fit', () => {
    const load = dayLoad([{ id: 'far', durationMinutes: 400, lat: 45, lon: -91 }], { lat: 44, lon: -91 }, 420)
    expect(load.visitMinutes).toBeLessThan(420)
    expect(load.over).toBe(true)
    expect(dayLoadWords(load)).toMatch(/^\d+(\.\d)? h of 7 h \(\d+(\.\d)? h driving\)$/)
  })
  it('counts stops without coordinates by their duration only and says how many', () => {
    const load = dayLoad([{ id: 'x', durationMinutes: 60, lat: null, lon: null }, { id: 'y', durationMinutes: 30, lat: 44, lon: -91 }], null, 60)
    expect(load).toMatchObject({ visitMinutes: 90, drivingMinutes: 0, stopsWithoutPlace: 1, over: true })
  })
})

import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  greatCircleKm,
  orderStops,
  ROUTE_ASSUMPTIONS,
  ROUTE_EARTH_RADIUS_KM,
  routeLegs,
  routeLengthKm,
  type RouteCoordinate,
  type RouteStopInput,
} from '../../shared/utils/route-order'

// ---------------------------------------------------------------------------------------------
// Test-side helpers. They are written independently of the module (no shared code), so that a
// mistake in the module's move arithmetic is not mirrored here.
// ---------------------------------------------------------------------------------------------

const R = ROUTE_EARTH_RADIUS_KM

/** Deterministic PRNG (mulberry32) so the quality checks run on the same instances every time. */
function rng(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** n stops scattered over a box of about 55 × 85 km, plus a home base inside it. */
function randomInstance(seed: number, n: number): { home: RouteCoordinate; stops: RouteStopInput[] } {
  const r = rng(seed)
  const at = () => ({ lat: 40 + r() * 0.5, lon: 10 + r() * 1.0 })
  const home = at()
  const stops = Array.from({ length: n }, (_, i) => ({ id: `s${i}`, ...at() }))
  return { home, stops }
}

/** Fixed scramble of 0..n-1 (Fisher–Yates on the seeded PRNG). */
function scramble<T>(items: T[], seed: number): T[] {
  const out = [...items]
  const r = rng(seed)
  for (let i = out.length - 1; i > 0; i--) {
    const j = Math.floor(r() * (i + 1))
    ;[out[i], out[j]] = [out[j]!, out[i]!]
  }
  return out
}

/** Matrix over [home, ...stops] built with the public greatCircleKm. */
function matrix(home: RouteCoordinate, stops: RouteCoordinate[]): number[][] {
  const pts = [home, ...stops]
  return pts.map((p) => pts.map((q) => greatCircleKm(p, q)))
}

/** Length of home → stops[order[0]] → … with 0-based stop indexes. */
function pathKm(d: number[][], order: number[]): number {
  let total = 0
  let from = 0
  for (const i of order) {
    total += d[from]![i + 1]!
    from = i + 1
  }
  return total
}

/** Minimum over all n! orders (plain recursion, no pruning). */
function bruteForceMinKm(d: number[][], n: number): number {
  let best = n === 0 ? 0 : Infinity
  const used = new Array<boolean>(n).fill(false)
  const walk = (from: number, depth: number, sofar: number) => {
    if (depth === n) {
      if (sofar < best) best = sofar
      return
    }
    for (let k = 0; k < n; k++) {
      if (used[k]) continue
      used[k] = true
      walk(k + 1, depth + 1, sofar + d[from]![k + 1]!)
      used[k] = false
    }
  }
  walk(0, 0, 0)
  return best
}

/** Exact optimum by the "cost so far" Held–Karp (the module uses "cost to go"). */
function heldKarpMinKm(d: number[][], n: number): number {
  const size = 1 << n
  const dp = Array.from({ length: size }, () => new Array<number>(n).fill(Infinity))
  for (let j = 0; j < n; j++) dp[1 << j]![j] = d[0]![j + 1]!
  for (let mask = 1; mask < size; mask++) {
    for (let j = 0; j < n; j++) {
      const here = dp[mask]![j]!
      if (!(mask & (1 << j)) || here === Infinity) continue
      for (let k = 0; k < n; k++) {
        if (mask & (1 << k)) continue
        const next = mask | (1 << k)
        const v = here + d[j + 1]![k + 1]!
        if (v < dp[next]![k]!) dp[next]![k] = v
      }
    }
  }
  return Math.min(...dp[size - 1]!)
}

/** Plain nearest-neighbour order from home (0-based stop indexes). */
function nearestNeighbour(d: number[][], n: number): number[] {
  const used = new Array<boolean>(n).fill(false)
  const order: number[] = []
  let from = 0
  for (let step = 0; step < n; step++) {
    let next = -1
    for (let k = 0; k < n; k++) if (!used[k] && (next < 0 || d[from]![k + 1]! < d[from]![next + 1]!)) next = k
    used[next] = true
    order.push(next)
    from = next + 1
  }
  return order
}

/**
 * Looks for a 2-opt move (reverse any slice, including one that runs to the end of the path) or
 * an Or-opt move (run of 1–3 stops moved anywhere, either orientation) that shortens the path by
 * more than `eps` km. Every candidate is built as a whole new order and measured from scratch.
 */
function findImprovingMove(d: number[][], order: number[], eps = 1e-7): string | null {
  const n = order.length
  const current = pathKm(d, order)
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const cand = [...order.slice(0, i), ...order.slice(i, j + 1).reverse(), ...order.slice(j + 1)]
      if (pathKm(d, cand) < current - eps) return `2-opt reverse [${i}..${j}]`
    }
  }
  for (let len = 1; len <= 3; len++) {
    for (let i = 0; i + len <= n; i++) {
      const run = order.slice(i, i + len)
      const rest = [...order.slice(0, i), ...order.slice(i + len)]
      for (let at = 0; at <= rest.length; at++) {
        for (const r of [run, [...run].reverse()]) {
          const cand = [...rest.slice(0, at), ...r, ...rest.slice(at)]
          if (pathKm(d, cand) < current - eps) return `or-opt move [${i}..${i + len - 1}] to ${at}`
        }
      }
    }
  }
  return null
}

function indexesOf(stops: RouteStopInput[], ids: string[]): number[] {
  const at = new Map(stops.map((s, i) => [s.id, i]))
  return ids.map((id) => at.get(id)!)
}

/** Point at `km` from `from` along initial bearing `bearingDeg` (spherical destination formula). */
function destination(from: RouteCoordinate, bearingDeg: number, km: number): RouteCoordinate {
  const rad = Math.PI / 180
  const delta = km / R
  const phi1 = from.lat * rad
  const theta = bearingDeg * rad
  const phi2 = Math.asin(Math.sin(phi1) * Math.cos(delta) + Math.cos(phi1) * Math.sin(delta) * Math.cos(theta))
  const lambda2 =
    from.lon * rad +
    Math.atan2(Math.sin(theta) * Math.sin(delta) * Math.cos(phi1), Math.cos(delta) - Math.sin(phi1) * Math.sin(phi2))
  return { lat: phi2 / rad, lon: lambda2 / rad }
}

/** Central angle via unit vectors and atan2(|u × v|, u · v): a formula independent of haversine. */
function vectorKm(a: RouteCoordinate, b: RouteCoordinate): number {
  const rad = Math.PI / 180
  const v = (p: RouteCoordinate) => [
    Math.cos(p.lat * rad) * Math.cos(p.lon * rad),
    Math.cos(p.lat * rad) * Math.sin(p.lon * rad),
    Math.sin(p.lat * rad),
  ]
  const [ux, uy, uz] = v(a) as [number, number, number]
  const [wx, wy, wz] = v(b) as [number, number, number]
  const cx = uy * wz - uz * wy
  const cy = uz * wx - ux * wz
  const cz = ux * wy - uy * wx
  return R * Math.atan2(Math.hypot(cx, cy, cz), ux * wx + uy * wy + uz * wz)
}

const coordArb = fc.record({
  lat: fc.double({ min: -90, max: 90, noNaN: true }),
  lon: fc.double({ min: -180, max: 180, noNaN: true }),
})

// ---------------------------------------------------------------------------------------------

describe('greatCircleKm (haversine on the IUGG mean-radius sphere, R = 6371.0088 km)', () => {
  it('uses the IUGG mean Earth radius R1 = 6371.0088 km (Moritz, Geodetic Reference System 1980)', () => {
    expect(ROUTE_EARTH_RADIUS_KM).toBe(6371.0088)
  })

  it('gives 111.195 km for one degree of latitude (computed: 2πR/360)', () => {
    const km = greatCircleKm({ lat: 0, lon: 0 }, { lat: 1, lon: 0 })
    expect(km).toBeCloseTo((2 * Math.PI * R) / 360, 9)
    expect(km).toBeCloseTo(111.195, 3)
    // The same degree anywhere along a meridian.
    expect(greatCircleKm({ lat: 44.5, lon: -73 }, { lat: 45.5, lon: -73 })).toBeCloseTo(111.195, 3)
  })

  it('gives 10007.5 km for a quarter meridian, equator to pole (computed: πR/2)', () => {
    const km = greatCircleKm({ lat: 0, lon: 0 }, { lat: 90, lon: 0 })
    expect(km).toBeCloseTo((Math.PI * R) / 2, 9)
    expect(km).toBeCloseTo(10007.557, 3)
  })

  it('gives πR/2 for a quarter of the equator, (0,0) → (0,90) (computed)', () => {
    expect(greatCircleKm({ lat: 0, lon: 0 }, { lat: 0, lon: 90 })).toBeCloseTo((Math.PI * R) / 2, 9)
  })

  it('gives πR for antipodal points and over the pole for (45,0) → (45,180) = 90° of arc (computed)', () => {
    expect(greatCircleKm({ lat: 0, lon: 0 }, { lat: 0, lon: 180 })).toBeCloseTo(Math.PI * R, 9)
    expect(greatCircleKm({ lat: 30, lon: 20 }, { lat: -30, lon: -160 })).toBeCloseTo(Math.PI * R, 9)
    expect(greatCircleKm({ lat: 45, lon: 0 }, { lat: 45, lon: 180 })).toBeCloseTo((Math.PI * R) / 2, 9)
  })

  it('crosses the antimeridian the short way: (0,179.5) → (0,-179.5) is one degree', () => {
    expect(greatCircleKm({ lat: 0, lon: 179.5 }, { lat: 0, lon: -179.5 })).toBeCloseTo((2 * Math.PI * R) / 360, 9)
  })

  it('shrinks a degree of longitude by cos(latitude) for short hops (small-angle check at 60°)', () => {
    // 0.01° of longitude at 60° N: the arc is within 1e-6 relative of R·cos 60°·0.01° in radians.
    const km = greatCircleKm({ lat: 60, lon: 5 }, { lat: 60, lon: 5.01 })
    const expected = R * Math.cos((60 * Math.PI) / 180) * ((0.01 * Math.PI) / 180)
    expect(Math.abs(km - expected) / expected).toBeLessThan(1e-6)
  })

  it('is zero for identical points and symmetric (fast-check)', () => {
    fc.assert(
      fc.property(coordArb, coordArb, (a, b) => {
        expect(greatCircleKm(a, a)).toBe(0)
        expect(greatCircleKm(a, b)).toBeCloseTo(greatCircleKm(b, a), 9)
      }),
    )
  })

  it('agrees with the independent vector formula atan2(|u×v|, u·v) (fast-check)', () => {
    // Haversine is ill-conditioned for nearly antipodal points (asin near 1): rounding in h of
    // ~1e-16 can move the result by up to ~0.1 m there, so those get a 1 m tolerance; 1 mm elsewhere.
    fc.assert(
      fc.property(coordArb, coordArb, (a, b) => {
        const ref = vectorKm(a, b)
        const tolerance = ref > Math.PI * R - 10 ? 1e-3 : 1e-6
        expect(Math.abs(greatCircleKm(a, b) - ref)).toBeLessThan(tolerance)
      }),
      { numRuns: 500 },
    )
  })

  it('rejects out-of-range and non-finite input with a RangeError naming the field', () => {
    const ok = { lat: 0, lon: 0 }
    expect(() => greatCircleKm({ lat: 95, lon: 0 }, ok)).toThrow(RangeError)
    expect(() => greatCircleKm({ lat: 95, lon: 0 }, ok)).toThrow(/a\.lat/)
    expect(() => greatCircleKm(ok, { lat: Number.NaN, lon: 0 })).toThrow(/b\.lat/)
    expect(() => greatCircleKm(ok, { lat: -90.0001, lon: 0 })).toThrow(/b\.lat/)
    expect(() => greatCircleKm({ lat: 0, lon: 181 }, ok)).toThrow(/a\.lon/)
    expect(() => greatCircleKm(ok, { lat: 0, lon: Number.NEGATIVE_INFINITY })).toThrow(/b\.lon/)
    expect(() => greatCircleKm(ok, { lat: '1' as unknown as number, lon: 0 })).toThrow(RangeError)
    // The limits themselves are valid.
    expect(greatCircleKm({ lat: -90, lon: -180 }, { lat: 90, lon: 180 })).toBeCloseTo(Math.PI * R, 9)
  })
})

describe('orderStops: small cases with a known best order (exact DP)', () => {
  it('returns [] for no stops and the single id for one stop', () => {
    expect(orderStops({ lat: 0, lon: 0 }, [])).toEqual([])
    expect(orderStops({ lat: 0, lon: 0 }, [{ id: 'only', lat: 1, lon: 1 }])).toEqual(['only'])
  })

  it('walks points on a line from the end nearest home (equator, given scrambled)', () => {
    const line = [1, 2, 3, 4, 5, 6, 7].map((k) => ({ id: `p${k}`, lat: 0, lon: k * 0.1 }))
    const stops = scramble(line, 7)
    expect(stops.map((s) => s.id)).not.toEqual(line.map((s) => s.id))
    // Home beyond the p1 end, on the line.
    expect(orderStops({ lat: 0, lon: 0 }, stops)).toEqual(['p1', 'p2', 'p3', 'p4', 'p5', 'p6', 'p7'])
    // Home beyond the p7 end.
    expect(orderStops({ lat: 0, lon: 0.85 }, stops)).toEqual(['p7', 'p6', 'p5', 'p4', 'p3', 'p2', 'p1'])
    // Home off to the side, near p1.
    expect(orderStops({ lat: 0.05, lon: 0.12 }, stops)).toEqual(['p1', 'p2', 'p3', 'p4', 'p5', 'p6', 'p7'])
  })

  it('walks three sides of a square with home at one corner; the tie between directions goes to input order', () => {
    // A square standing on one corner: home (0,0), far corner (0,1), side corners (±0.5,0.5).
    // Mirror images across the equator, so both directions are exactly as long.
    const up = { id: 'up', lat: 0.5, lon: 0.5 }
    const down = { id: 'down', lat: -0.5, lon: 0.5 }
    const far = { id: 'far', lat: 0, lon: 1 }
    const home = { lat: 0, lon: 0 }
    expect(orderStops(home, [far, down, up])).toEqual(['down', 'far', 'up'])
    expect(orderStops(home, [up, far, down])).toEqual(['up', 'far', 'down'])
    const side = greatCircleKm(home, up)
    expect(routeLengthKm(home, [up, far, down])).toBeCloseTo(3 * side, 9)
    // With the home corner itself also a stop, it is visited first (zero-length leg).
    expect(orderStops(home, [far, up, { id: 'corner', ...home }, down])).toEqual(['corner', 'up', 'far', 'down'])
  })

  it('walks round a circle one way when home is on the circle (stops given scrambled)', () => {
    const centre = { lat: 40.3, lon: 10.6 }
    const count = 8 // home + 7 stops, 45° apart
    const points = Array.from({ length: count }, (_, k) => destination(centre, (360 * k) / count, 5))
    const home = points[0]!
    const ring = points.slice(1).map((p, k) => ({ id: `c${k + 1}`, ...p }))
    const ids = orderStops(home, scramble(ring, 3))
    const clockwise = ring.map((s) => s.id)
    expect([clockwise, [...clockwise].reverse()]).toContainEqual(ids)
  })

  it('beats nearest-neighbour greedy where greedy is not optimal', () => {
    // On the equator, home at 0°, a at +1°, b at -1.2°, c at +3°.
    // Greedy: a (1°), then c (2°) before b (2.2°), then back to b (4.2°) = 7.2°.
    // Best: b (1.2°), a (2.2°), c (2°) = 5.4°.
    const home = { lat: 0, lon: 0 }
    const stops = [
      { id: 'a', lat: 0, lon: 1 },
      { id: 'b', lat: 0, lon: -1.2 },
      { id: 'c', lat: 0, lon: 3 },
    ]
    const d = matrix(home, stops)
    expect(nearestNeighbour(d, 3).map((i) => stops[i]!.id)).toEqual(['a', 'c', 'b'])
    const ids = orderStops(home, stops)
    expect(ids).toEqual(['b', 'a', 'c'])
    const degree = (2 * Math.PI * R) / 360
    expect(routeLengthKm(home, indexesOf(stops, ids).map((i) => stops[i]!))).toBeCloseTo(5.4 * degree, 9)
    expect(pathKm(d, nearestNeighbour(d, 3))).toBeCloseTo(7.2 * degree, 9)
  })

  it('handles stops at identical coordinates, keeping them in input order', () => {
    const home = { lat: 40, lon: 10 }
    const stops = [
      { id: 'x2', lat: 40.1, lon: 10.1 },
      { id: 'near', lat: 40.01, lon: 10 },
      { id: 'x1', lat: 40.1, lon: 10.1 },
      { id: 'x3', lat: 40.1, lon: 10.1 },
    ]
    expect(orderStops(home, stops)).toEqual(['near', 'x2', 'x1', 'x3'])
    // Everything at home: input order.
    const same = ['q', 'w', 'e', 'r'].map((id) => ({ id, ...home }))
    expect(orderStops(home, same)).toEqual(['q', 'w', 'e', 'r'])
  })

  it('is deterministic: the same input gives the same order', () => {
    const { home, stops } = randomInstance(99, 9)
    expect(orderStops(home, stops)).toEqual(orderStops(home, stops))
  })
})

describe('orderStops: exact for n ≤ 10', () => {
  const instanceArb = fc
    .record({
      home: coordArb,
      // Mostly spread points in a local box, plus a coarse grid that makes identical coordinates
      // and exact ties likely.
      pts: fc.array(
        fc.oneof(
          fc.record({ lat: fc.double({ min: 40, max: 41, noNaN: true }), lon: fc.double({ min: 10, max: 11, noNaN: true }) }),
          fc.record({ lat: fc.integer({ min: 0, max: 2 }), lon: fc.integer({ min: 0, max: 2 }) }),
          coordArb,
        ),
        { minLength: 0, maxLength: 7 },
      ),
    })
    .map(({ home, pts }) => ({ home, stops: pts.map((p, i) => ({ id: `s${i}`, ...p })) }))

  it('matches the minimum over all permutations for random n ≤ 7, within 1e-9 km (fast-check)', () => {
    fc.assert(
      fc.property(instanceArb, ({ home, stops }) => {
        const ids = orderStops(home, stops)
        expect([...ids].sort()).toEqual(stops.map((s) => s.id).sort())
        const d = matrix(home, stops)
        const got = pathKm(d, indexesOf(stops, ids))
        expect(Math.abs(got - bruteForceMinKm(d, stops.length))).toBeLessThan(1e-9)
      }),
      { numRuns: 200 },
    )
  })

  it('matches an independent Held–Karp for seeded n = 8, 9, 10', () => {
    for (const n of [8, 9, 10]) {
      for (let seed = 1; seed <= 4; seed++) {
        const { home, stops } = randomInstance(1000 * n + seed, n)
        const d = matrix(home, stops)
        const got = pathKm(d, indexesOf(stops, orderStops(home, stops)))
        expect(Math.abs(got - heldKarpMinKm(d, n))).toBeLessThan(1e-9)
      }
    }
  })
})

describe('orderStops: nearest neighbour + 2-opt + Or-opt for n > 10', () => {
  it('returns a permutation no longer than nearest-neighbour and with no improving 2-opt/Or-opt move, n = 11..30', () => {
    for (let n = 11; n <= 30; n++) {
      for (let seed = 1; seed <= 3; seed++) {
        const { home, stops } = randomInstance(7919 * n + seed, n)
        const ids = orderStops(home, stops)
        expect([...ids].sort()).toEqual(stops.map((s) => s.id).sort())
        const d = matrix(home, stops)
        const order = indexesOf(stops, ids)
        const got = pathKm(d, order)
        expect(got).toBeLessThanOrEqual(pathKm(d, nearestNeighbour(d, n)) + 1e-9)
        expect(findImprovingMove(d, order), `n=${n} seed=${seed}`).toBeNull()
      }
    }
  })

  it('the local-optimality checker does find moves on a poor order (so the check above can fail)', () => {
    const { home, stops } = randomInstance(4242, 15)
    const d = matrix(home, stops)
    expect(findImprovingMove(d, stops.map((_, i) => i))).not.toBeNull()
    expect(findImprovingMove(d, nearestNeighbour(d, 15))).not.toBeNull()
  })

  it('stays within 10 % of the exact optimum, 0.6 % on average, for seeded n = 11..14 (independent Held–Karp)', () => {
    // Fixed seeds, so this is deterministic. On these 40 instances the local search is optimal on
    // 32 and at most 5.1 % long; over a wider sample (160 instances) the worst seen was 12 %, so
    // the 10 % bound holds for these seeds, not as a guarantee.
    let sum = 0
    let count = 0
    for (let n = 11; n <= 14; n++) {
      for (let seed = 1; seed <= 10; seed++) {
        const { home, stops } = randomInstance(31 * n + seed, n)
        const d = matrix(home, stops)
        const got = pathKm(d, indexesOf(stops, orderStops(home, stops)))
        const best = heldKarpMinKm(d, n)
        expect(got).toBeGreaterThanOrEqual(best - 1e-9)
        expect(got / best, `n=${n} seed=${seed}`).toBeLessThanOrEqual(1.1)
        sum += got / best
        count++
      }
    }
    expect(sum / count).toBeLessThan(1.02)
  })

  it('is exact where the optimum is known: a line with home in the middle goes to the short side first', () => {
    // 3 stops west of home, 12 east. Best: west side first (3 + 3 + 12 = 18 steps);
    // greedy goes east first because the first two neighbours are tied (12 + 13 + 2 = 27 steps).
    const west = [1, 2, 3].map((k) => ({ id: `w${k}`, lat: 0, lon: -0.01 * k }))
    const east = Array.from({ length: 12 }, (_, k) => ({ id: `e${k + 1}`, lat: 0, lon: 0.01 * (k + 1) }))
    const stops = scramble([...east, ...west], 11)
    const home = { lat: 0, lon: 0 }
    const ids = orderStops(home, stops)
    expect(ids).toEqual([...west, ...east].map((s) => s.id))
    const step = (2 * Math.PI * R) / 360 / 100
    expect(routeLengthKm(home, indexesOf(stops, ids).map((i) => stops[i]!))).toBeCloseTo(18 * step, 9)
  })

  it('walks round a circle of 20 stops (given scrambled) one way', () => {
    const centre = { lat: -33.2, lon: 150.1 }
    const count = 21
    const points = Array.from({ length: count }, (_, k) => destination(centre, (360 * k) / count, 8))
    const home = points[0]!
    const ring = points.slice(1).map((p, k) => ({ id: `c${k + 1}`, ...p }))
    const ids = orderStops(home, scramble(ring, 5))
    const clockwise = ring.map((s) => s.id)
    expect([clockwise, [...clockwise].reverse()]).toContainEqual(ids)
  })

  it('keeps many stops at identical coordinates in input order', () => {
    const home = { lat: 40, lon: 10 }
    const stops = Array.from({ length: 14 }, (_, i) => ({ id: `k${i}`, lat: 40.2, lon: 10.2 }))
    expect(orderStops(home, stops)).toEqual(stops.map((s) => s.id))
  })

  it('orders 50 stops in under a second, and 200 stops too', () => {
    for (const [n, seed] of [
      [50, 5],
      [200, 6],
    ] as const) {
      const { home, stops } = randomInstance(seed, n)
      const t0 = performance.now()
      const ids = orderStops(home, stops)
      const ms = performance.now() - t0
      expect(ids).toHaveLength(n)
      expect(new Set(ids).size).toBe(n)
      expect(ms, `${n} stops took ${ms.toFixed(0)} ms`).toBeLessThan(1000)
    }
  })
})

describe('orderStops: input errors', () => {
  const home = { lat: 40, lon: 10 }
  it('throws a RangeError for latitude 95 or NaN, naming the stop', () => {
    expect(() => orderStops(home, [{ id: 'a', lat: 95, lon: 10 }])).toThrow(RangeError)
    expect(() => orderStops(home, [{ id: 'a', lat: 40, lon: 10 }, { id: 'b', lat: 95, lon: 10 }])).toThrow(/stops\[1\]\.lat/)
    expect(() => orderStops(home, [{ id: 'a', lat: Number.NaN, lon: 10 }])).toThrow(/stops\[0\]\.lat/)
    expect(() => orderStops(home, [{ id: 'a', lat: 40, lon: 200 }])).toThrow(/stops\[0\]\.lon/)
    expect(() => orderStops({ lat: 95, lon: 0 }, [])).toThrow(/home\.lat/)
  })
  it('throws on duplicate ids, small and large', () => {
    expect(() => orderStops(home, [{ id: 'a', lat: 40, lon: 10 }, { id: 'a', lat: 40.1, lon: 10 }])).toThrow(/duplicate/)
    const many = Array.from({ length: 20 }, (_, i) => ({ id: i === 19 ? 's3' : `s${i}`, lat: 40 + i / 100, lon: 10 }))
    expect(() => orderStops(home, many)).toThrow(/"s3"/)
  })
})

describe('routeLegs and routeLengthKm', () => {
  const home = { lat: 40, lon: 10 }
  const stops = [
    { id: 'a', lat: 40.05, lon: 10.02 },
    { id: 'b', lat: 40.11, lon: 10.09 },
    { id: 'c', lat: 40.02, lon: 10.15 },
  ]

  it('exports the defaults: detour factor 1.3 and 40 km/h (common practice, no source)', () => {
    expect(ROUTE_ASSUMPTIONS).toEqual({ detourFactor: 1.3, speedKmh: 40 })
  })

  it('estimates each leg as km × 1.3 at 40 km/h: minutes = gc km × 1.3 / 40 × 60 (common practice, no source)', () => {
    const r = routeLegs(home, stops)
    expect(r.legs.map((l) => l.toId)).toEqual(['a', 'b', 'c'])
    const froms = [home, ...stops]
    r.legs.forEach((leg, i) => {
      const gc = greatCircleKm(froms[i]!, stops[i]!)
      expect(leg.km).toBeCloseTo(gc * 1.3, 9)
      expect(leg.minutes).toBeCloseTo(((gc * 1.3) / 40) * 60, 9)
    })
    // A hand-checkable leg: one degree of latitude is 111.1951 km → 144.5536 km by road
    // → 144.5536 / 40 h = 216.830 min.
    const one = routeLegs({ lat: 0, lon: 0 }, [{ id: 'n', lat: 1, lon: 0 }])
    expect(one.legs[0]!.km).toBeCloseTo(144.554, 3)
    expect(one.legs[0]!.minutes).toBeCloseTo(216.830, 3)
  })

  it('adds the legs up to the totals, and totalKm is the route length × detour factor', () => {
    const r = routeLegs(home, stops)
    expect(r.totalKm).toBeCloseTo(r.legs.reduce((s, l) => s + l.km, 0), 9)
    expect(r.totalMinutes).toBeCloseTo(r.legs.reduce((s, l) => s + l.minutes, 0), 9)
    expect(r.totalKm).toBeCloseTo(routeLengthKm(home, stops) * 1.3, 9)
    expect(r.totalMinutes).toBeCloseTo((r.totalKm / 40) * 60, 9)
  })

  it('takes other speed and detour figures', () => {
    const r = routeLegs(home, stops, { speedKmh: 60, detourFactor: 1 })
    expect(r.totalKm).toBeCloseTo(routeLengthKm(home, stops), 9)
    expect(r.totalMinutes).toBeCloseTo(routeLengthKm(home, stops), 9) // 60 km/h: one minute per km
    expect(() => routeLegs(home, stops, { speedKmh: 0 })).toThrow(RangeError)
    expect(() => routeLegs(home, stops, { detourFactor: 0.5 })).toThrow(RangeError)
    expect(() => routeLegs(home, stops, { speedKmh: Number.NaN })).toThrow(RangeError)
  })

  it('has no return leg, and an empty day is zero', () => {
    expect(routeLegs(home, [])).toEqual({ legs: [], totalKm: 0, totalMinutes: 0 })
    expect(routeLengthKm(home, [])).toBe(0)
    expect(routeLegs(home, stops).legs).toHaveLength(3)
    const back = routeLengthKm(home, [...stops, { ...home }])
    expect(back).toBeGreaterThan(routeLengthKm(home, stops) + 1)
  })

  it('rejects invalid coordinates', () => {
    expect(() => routeLegs(home, [{ id: 'a', lat: 95, lon: 0 }])).toThrow(/orderedStops\[0\]\.lat/)
    expect(() => routeLengthKm({ lat: Number.NaN, lon: 0 }, [])).toThrow(/home\.lat/)
  })
})

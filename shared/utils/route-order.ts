// Driving order for a technician's day, from site coordinates.
//
// The route is OPEN: it starts at the technician's home base and ends at the last stop; there is
// no return leg. Distances are great-circle distances on a sphere; driving time is a rough
// estimate derived from them (see ROUTE_ASSUMPTIONS).
//
// Pure TypeScript, no I/O. Every export of this file is auto-imported across the app and server,
// so the names are deliberately specific.

/** A position in decimal degrees (WGS 84 style: lat in [-90, 90], lon in [-180, 180]). */
export interface RouteCoordinate {
  lat: number
  lon: number
}

/** A site to visit. `id` must be unique within one call. */
export interface RouteStopInput extends RouteCoordinate {
  id: string
}

export interface RouteLeg {
  /** Id of the stop this leg arrives at (the first leg starts at the home base). */
  toId: string
  /** Estimated driving distance: great-circle km × detourFactor. */
  km: number
  /** Estimated driving time at speedKmh. */
  minutes: number
}

export interface RouteLegsOptions {
  speedKmh?: number
  detourFactor?: number
}

export interface RouteLegsResult {
  legs: RouteLeg[]
  totalKm: number
  totalMinutes: number
}

/** IUGG mean Earth radius R1 = (2a + b) / 3 for the GRS 80 / WGS 84 ellipsoid, in km. */
export const ROUTE_EARTH_RADIUS_KM = 6371.0088

/**
 * Defaults for turning great-circle distance into a driving estimate.
 * Both values are common practice, not taken from any source:
 * - detourFactor 1.3: road distance is assumed to be about 30 % longer than the straight line;
 * - speedKmh 40: an average door-to-door speed for mixed town and suburban driving.
 * Callers with better local figures should pass their own.
 */
export const ROUTE_ASSUMPTIONS = Object.freeze({ detourFactor: 1.3, speedKmh: 40 })

/** Up to this many stops the exact order is computed (Held–Karp); above it, local search. */
const EXACT_MAX_STOPS = 10

/** A local-search move must shorten the route by more than this (km) to count; absorbs rounding. */
const IMPROVEMENT_EPS_KM = 1e-9

const DEG = Math.PI / 180

function checkCoordinate(p: RouteCoordinate, name: string): void {
  if (p === null || typeof p !== 'object') throw new RangeError(`${name} must be an object with lat and lon`)
  const { lat, lon } = p
  if (typeof lat !== 'number' || !Number.isFinite(lat) || lat < -90 || lat > 90) {
    throw new RangeError(`${name}.lat must be a finite number in [-90, 90], got ${String(lat)}`)
  }
  if (typeof lon !== 'number' || !Number.isFinite(lon) || lon < -180 || lon > 180) {
    throw new RangeError(`${name}.lon must be a finite number in [-180, 180], got ${String(lon)}`)
  }
}

/** Haversine without validation; callers validate first. */
function haversineKm(a: RouteCoordinate, b: RouteCoordinate): number {
  const phi1 = a.lat * DEG
  const phi2 = b.lat * DEG
  const sinDPhi = Math.sin((phi2 - phi1) / 2)
  const sinDLambda = Math.sin(((b.lon - a.lon) * DEG) / 2)
  const h = sinDPhi * sinDPhi + Math.cos(phi1) * Math.cos(phi2) * sinDLambda * sinDLambda
  // h can exceed 1 by a rounding error for nearly antipodal points.
  return 2 * ROUTE_EARTH_RADIUS_KM * Math.asin(Math.sqrt(Math.min(1, Math.max(0, h))))
}

/**
 * Great-circle distance in km between two positions (haversine formula on a sphere of radius
 * ROUTE_EARTH_RADIUS_KM). Throws a RangeError naming the offending field for a latitude outside
 * [-90, 90], a longitude outside [-180, 180], or a non-finite value.
 */
export function greatCircleKm(a: RouteCoordinate, b: RouteCoordinate): number {
  checkCoordinate(a, 'a')
  checkCoordinate(b, 'b')
  return haversineKm(a, b)
}

function checkStops(stops: readonly RouteStopInput[], name: string, uniqueIds: boolean): void {
  if (!Array.isArray(stops)) throw new TypeError(`${name} must be an array`)
  const seen = new Set<string>()
  stops.forEach((s, i) => {
    checkCoordinate(s, `${name}[${i}]`)
    if (typeof s.id !== 'string') throw new TypeError(`${name}[${i}].id must be a string`)
    if (uniqueIds) {
      if (seen.has(s.id)) throw new Error(`${name}[${i}].id "${s.id}" is a duplicate stop id`)
      seen.add(s.id)
    }
  })
}

/** Symmetric distance matrix, row-major (size m × m); index 0 is home, i ≥ 1 is stops[i - 1]. */
function distanceMatrix(home: RouteCoordinate, stops: readonly RouteCoordinate[]): Float64Array {
  const points = [home, ...stops]
  const m = points.length
  const d = new Float64Array(m * m)
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j < m; j++) {
      const km = haversineKm(points[i]!, points[j]!)
      d[i * m + j] = km
      d[j * m + i] = km
    }
  }
  return d
}

/**
 * Exact best open path by Held–Karp dynamic programming, O(2^n · n²) time, O(2^n · n) memory.
 *
 * best[mask·n + j] is the shortest path that starts at stop j, having visited exactly the stops
 * in `mask` (j included), and then visits every remaining stop. Working "cost to go" rather than
 * "cost so far" lets the order be rebuilt from the front, which makes the tie-break simple: at
 * each step the earliest stop in input order that still achieves the optimum is taken, so among
 * equally short orders the lexicographically first one (by input position) is returned.
 * Returns 0-based stop indexes.
 */
function exactOrder(n: number, d: Float64Array): number[] {
  const m = n + 1
  const full = (1 << n) - 1
  const best = new Float64Array((full + 1) * n).fill(Infinity)
  for (let j = 0; j < n; j++) best[full * n + j] = 0
  for (let mask = full - 1; mask > 0; mask--) {
    for (let j = 0; j < n; j++) {
      if (!(mask & (1 << j))) continue
      let value = Infinity
      const row = (j + 1) * m
      for (let k = 0; k < n; k++) {
        if (mask & (1 << k)) continue
        const candidate = d[row + k + 1]! + best[(mask | (1 << k)) * n + k]!
        if (candidate < value) value = candidate
      }
      best[mask * n + j] = value
    }
  }

  const order: number[] = []
  let mask = 0
  let from = 0 // matrix index of the current position (0 = home)
  let remaining = Infinity
  for (let k = 0; k < n; k++) remaining = Math.min(remaining, d[k + 1]! + best[(1 << k) * n + k]!)
  for (let step = 0; step < n; step++) {
    // Float sums of the same path in a different grouping can differ in the last bits, so
    // "achieves the optimum" allows a few ulps of the remaining length.
    const tolerance = 8 * Number.EPSILON * Math.max(1, remaining)
    let chosen = -1
    for (let k = 0; k < n; k++) {
      if (mask & (1 << k)) continue
      const candidate = d[from * m + k + 1]! + best[(mask | (1 << k)) * n + k]!
      if (candidate <= remaining + tolerance) {
        chosen = k
        break
      }
    }
    if (chosen < 0) throw new Error('internal error: no stop achieves the optimum') // unreachable
    mask |= 1 << chosen
    order.push(chosen)
    from = chosen + 1
    remaining = best[mask * n + chosen]!
  }
  return order
}

/** Nearest neighbour from home; ties go to the earlier stop in input order. Returns 1-based matrix indexes. */
function nearestNeighbourPath(n: number, d: Float64Array): number[] {
  const m = n + 1
  const visited = new Uint8Array(m)
  const path = [0]
  visited[0] = 1
  let from = 0
  for (let step = 0; step < n; step++) {
    let next = -1
    let nextKm = Infinity
    for (let k = 1; k < m; k++) {
      if (visited[k]) continue
      const km = d[from * m + k]!
      if (km < nextKm) {
        nextKm = km
        next = k
      }
    }
    visited[next] = 1
    path.push(next)
    from = next
  }
  return path
}

/**
 * 2-opt pass on an open path (path[0] is home and stays first). Reversing path[i..j] replaces the
 * edges (path[i-1], path[i]) and (path[j], path[j+1]) with (path[i-1], path[j]) and
 * (path[i], path[j+1]); when j is the last position there is no following edge, so only the first
 * edge changes (the tail is simply walked the other way). Applies every improving move found
 * (first improvement, scanning in index order) and reports whether any was applied.
 */
function twoOptPass(path: number[], d: Float64Array, m: number): boolean {
  const last = path.length - 1
  let improved = false
  for (let i = 1; i < last; i++) {
    for (let j = i + 1; j <= last; j++) {
      const a = path[i - 1]!
      const b = path[i]!
      const c = path[j]!
      let delta = d[a * m + c]! - d[a * m + b]!
      if (j < last) {
        const e = path[j + 1]!
        delta += d[b * m + e]! - d[c * m + e]!
      }
      if (delta < -IMPROVEMENT_EPS_KM) {
        for (let lo = i, hi = j; lo < hi; lo++, hi--) {
          const t = path[lo]!
          path[lo] = path[hi]!
          path[hi] = t
        }
        improved = true
      }
    }
  }
  return improved
}

/**
 * Or-opt pass on an open path: move a run of 1–3 consecutive stops path[i..e] to another place,
 * kept in order or reversed. Taking the run out saves (path[i-1], path[i]) + (path[e], path[e+1])
 * − (path[i-1], path[e+1]), or just (path[i-1], path[i]) when the run ends the path. Putting it
 * after path[k] costs (path[k], first) + (last, path[k+1]) − (path[k], path[k+1]), or just
 * (path[k], first) when path[k] is the end of the remaining path. Applies every improving move
 * found and reports whether any was applied.
 */
function orOptPass(path: number[], d: Float64Array, m: number): boolean {
  const last = path.length - 1
  let improved = false
  for (let len = 1; len <= 3; len++) {
    for (let i = 1; i + len - 1 <= last; i++) {
      const e = i + len - 1
      const before = path[i - 1]!
      const head = path[i]!
      const tail = path[e]!
      const removeGain =
        e < last
          ? d[before * m + head]! + d[tail * m + path[e + 1]!]! - d[before * m + path[e + 1]!]!
          : d[before * m + head]!
      let moved = false
      for (let k = 0; k <= last && !moved; k++) {
        // Positions i-1..e would put the run back where it is (its in-place reversal is a 2-opt move).
        if (k >= i - 1 && k <= e) continue
        const p = path[k]!
        const hasNext = k < last
        const q = hasNext ? path[k + 1]! : -1
        for (let reversed = 0; reversed <= (len > 1 ? 1 : 0); reversed++) {
          const first = reversed ? tail : head
          const lastOfRun = reversed ? head : tail
          const insertCost = hasNext
            ? d[p * m + first]! + d[lastOfRun * m + q]! - d[p * m + q]!
            : d[p * m + first]!
          if (insertCost - removeGain < -IMPROVEMENT_EPS_KM) {
            const run = path.slice(i, e + 1)
            if (reversed) run.reverse()
            const rest = [...path.slice(0, i), ...path.slice(e + 1)]
            const at = k < i ? k + 1 : k + 1 - len // position in `rest` after which the run goes
            path.splice(0, path.length, ...rest.slice(0, at), ...run, ...rest.slice(at))
            moved = true
            improved = true
            break
          }
        }
      }
    }
  }
  return improved
}

/**
 * Nearest-neighbour path improved by 2-opt and Or-opt until neither finds an improving move.
 * Each pass is O(n²); the number of passes is small in practice (no useful worst-case bound).
 * Returns 0-based stop indexes.
 */
function heuristicOrder(n: number, d: Float64Array): number[] {
  const m = n + 1
  const path = nearestNeighbourPath(n, d)
  let improved = true
  while (improved) {
    improved = twoOptPass(path, d, m)
    if (orOptPass(path, d, m)) improved = true
  }
  return path.slice(1).map((k) => k - 1)
}

/**
 * Stop ids in visiting order, minimising the total great-circle length of the open path
 * home → s1 → … → sn (no return to home).
 *
 * - n ≤ 10: exact optimum by Held–Karp dynamic programming, O(2^n · n²).
 * - n > 10: nearest neighbour from home, then 2-opt and Or-opt (runs of 1–3 stops, both
 *   orientations) repeated until no move improves the route: a local optimum, not a guarantee.
 *
 * Deterministic: among equally good choices the earlier stop in input order wins. Stops at
 * identical coordinates are allowed. Throws on invalid coordinates (RangeError) and on duplicate ids.
 */
export function orderStops(home: RouteCoordinate, stops: RouteStopInput[]): string[] {
  checkCoordinate(home, 'home')
  checkStops(stops, 'stops', true)
  const n = stops.length
  if (n === 0) return []
  if (n === 1) return [stops[0]!.id]
  const d = distanceMatrix(home, stops)
  const order = n <= EXACT_MAX_STOPS ? exactOrder(n, d) : heuristicOrder(n, d)
  return order.map((i) => stops[i]!.id)
}

/** Total great-circle length in km of the open path home → orderedStops[0] → … (no return leg). */
export function routeLengthKm(home: RouteCoordinate, orderedStops: RouteCoordinate[]): number {
  checkCoordinate(home, 'home')
  if (!Array.isArray(orderedStops)) throw new TypeError('orderedStops must be an array')
  let total = 0
  let from = home
  orderedStops.forEach((s, i) => {
    checkCoordinate(s, `orderedStops[${i}]`)
    total += haversineKm(from, s)
    from = s
  })
  return total
}

/**
 * Per-leg driving estimate for stops already in visiting order: km = great-circle km ×
 * detourFactor, minutes = km / speedKmh × 60. Defaults come from ROUTE_ASSUMPTIONS (common
 * practice, no source). Totals are plain sums of the legs; nothing is rounded.
 */
export function routeLegs(
  home: RouteCoordinate,
  orderedStops: RouteStopInput[],
  opts: RouteLegsOptions = {},
): RouteLegsResult {
  const speedKmh = opts.speedKmh ?? ROUTE_ASSUMPTIONS.speedKmh
  const detourFactor = opts.detourFactor ?? ROUTE_ASSUMPTIONS.detourFactor
  if (typeof speedKmh !== 'number' || !Number.isFinite(speedKmh) || speedKmh <= 0) {
    throw new RangeError(`opts.speedKmh must be a finite number above 0, got ${String(speedKmh)}`)
  }
  if (typeof detourFactor !== 'number' || !Number.isFinite(detourFactor) || detourFactor < 1) {
    throw new RangeError(`opts.detourFactor must be a finite number of at least 1, got ${String(detourFactor)}`)
  }
  checkCoordinate(home, 'home')
  checkStops(orderedStops, 'orderedStops', false)
  const legs: RouteLeg[] = []
  let totalKm = 0
  let totalMinutes = 0
  let from: RouteCoordinate = home
  for (const s of orderedStops) {
    const km = haversineKm(from, s) * detourFactor
    const minutes = (km / speedKmh) * 60
    legs.push({ toId: s.id, km, minutes })
    totalKm += km
    totalMinutes += minutes
    from = s
  }
  return { legs, totalKm, totalMinutes }
}

// Grouping by area, deterministically: sites bucketed into grid cells, and a capacity-limited
// k-means that gives each group (a technician's territory, or a weekday's part of it) nearby
// items up to a load limit. No randomness: centres start from given points, ties go to the lower
// index.
import { greatCircleKm, type RouteCoordinate } from '../route-order'

export interface AreaItem extends RouteCoordinate {
  /** Load, e.g. minutes of work. */
  weight: number
}

/**
 * Buckets points into square-ish grid cells about `cellKm` across (cell sizes measured with
 * greatCircleKm at the points' mean latitude). Returns each point's cell number.
 */
export function gridCells(points: readonly RouteCoordinate[], cellKm: number): Int32Array {
  const cells = new Int32Array(points.length)
  if (points.length === 0) return cells
  let latSum = 0
  let minLat = Infinity
  let minLon = Infinity
  for (const p of points) {
    latSum += p.lat
    minLat = Math.min(minLat, p.lat)
    minLon = Math.min(minLon, p.lon)
  }
  const lat = latSum / points.length
  const kmPerDegLat = greatCircleKm({ lat: Math.max(-89.5, lat - 0.5), lon: 0 }, { lat: Math.min(89.5, lat + 0.5), lon: 0 })
  const kmPerDegLon = Math.max(1e-6, greatCircleKm({ lat, lon: 0 }, { lat, lon: 1 }))
  const dLat = cellKm / kmPerDegLat
  const dLon = cellKm / kmPerDegLon
  const key = new Map<string, number>()
  points.forEach((p, i) => {
    const k = `${Math.floor((p.lat - minLat) / dLat)},${Math.floor((p.lon - minLon) / dLon)}`
    let c = key.get(k)
    if (c === undefined) {
      c = key.size
      key.set(k, c)
    }
    cells[i] = c
  })
  return cells
}

/** Weighted mean position (plain mean of degrees: fine for one region, not across the 180° meridian). */
function centreOf(items: readonly AreaItem[], members: readonly number[], fallback: RouteCoordinate): RouteCoordinate {
  let w = 0
  let lat = 0
  let lon = 0
  for (const i of members) {
    const it = items[i]!
    const wi = Math.max(it.weight, 1e-9)
    w += wi
    lat += it.lat * wi
    lon += it.lon * wi
  }
  return w > 0 ? { lat: lat / w, lon: lon / w } : fallback
}

/**
 * Farthest-point starting centres: each next centre is the item farthest from those chosen so
 * far (the heaviest item first). Deterministic.
 */
export function spreadCentres(items: readonly AreaItem[], k: number): RouteCoordinate[] {
  if (items.length === 0) return []
  let first = 0
  items.forEach((it, i) => {
    if (it.weight > items[first]!.weight) first = i
  })
  const centres: RouteCoordinate[] = [{ lat: items[first]!.lat, lon: items[first]!.lon }]
  const nearest = items.map(it => greatCircleKm(it, centres[0]!))
  while (centres.length < k) {
    let far = 0
    nearest.forEach((d, i) => {
      if (d > nearest[far]!) far = i
    })
    const c = { lat: items[far]!.lat, lon: items[far]!.lon }
    centres.push(c)
    items.forEach((it, i) => {
      nearest[i] = Math.min(nearest[i]!, greatCircleKm(it, c))
    })
  }
  return centres
}

/**
 * Capacity-limited k-means. Each round, items go (those with the most to lose first: largest gap
 * between their nearest and second-nearest centre) to the nearest centre whose load stays within
 * its limit — or, when none has room, to the nearest centre; then centres move to their members'
 * weighted mean. `baseLoad` is load a group already carries (e.g. customers pinned to it).
 * Returns each item's group.
 */
export function balancedGroups(items: readonly AreaItem[], startCentres: readonly RouteCoordinate[], limits: readonly number[], baseLoad: readonly number[] = [], rounds = 8): Int32Array {
  const k = startCentres.length
  const n = items.length
  const group = new Int32Array(n).fill(-1)
  if (k === 0 || n === 0) return group
  let centres = startCentres.map(c => ({ lat: c.lat, lon: c.lon }))
  const dist = new Float64Array(n * k)
  const order = Array.from({ length: n }, (_, i) => i)
  const regret = new Float64Array(n)
  for (let round = 0; round < rounds; round++) {
    for (let i = 0; i < n; i++) {
      let best = Infinity
      let second = Infinity
      for (let g = 0; g < k; g++) {
        const d = greatCircleKm(items[i]!, centres[g]!)
        dist[i * k + g] = d
        if (d < best) {
          second = best
          best = d
        }
        else if (d < second) second = d
      }
      regret[i] = k > 1 ? second - best : 0
    }
    order.sort((a, b) => regret[b]! - regret[a]! || a - b)
    const load = Array.from({ length: k }, (_, g) => baseLoad[g] ?? 0)
    let changed = false
    for (const i of order) {
      let pick = -1
      let fallback = 0
      for (let g = 0; g < k; g++) {
        const d = dist[i * k + g]!
        if (d < dist[i * k + fallback]!) fallback = g
        if (load[g]! + items[i]!.weight <= limits[g]! && (pick < 0 || d < dist[i * k + pick]!)) pick = g
      }
      if (pick < 0) pick = fallback
      load[pick]! += items[i]!.weight
      if (group[i] !== pick) changed = true
      group[i] = pick
    }
    const members: number[][] = Array.from({ length: k }, () => [])
    for (let i = 0; i < n; i++) members[group[i]!]!.push(i)
    centres = centres.map((c, g) => centreOf(items, members[g]!, c))
    if (!changed && round > 0) break
  }
  return group
}

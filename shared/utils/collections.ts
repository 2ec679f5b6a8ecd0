// Small helpers over lists (pure).

/** The rows grouped by a key, each group in the order the rows came, groups in order of first appearance. */
export function groupRows<T, K>(rows: Iterable<T>, keyOf: (row: T) => K): Map<K, T[]> {
  const groups = new Map<K, T[]>()
  for (const row of rows) {
    const key = keyOf(row)
    const group = groups.get(key)
    if (group) group.push(row)
    else groups.set(key, [row])
  }
  return groups
}

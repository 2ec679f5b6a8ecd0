// The trend charts, in the catalogue's order: one chart per chart group of the parameter
// catalogue, drawing each of its parameters (two at most: the second on a right-hand axis).
import { PARAMETER_CATALOGUE, PARAMETER_LIST, type ChartGroup, type ReadingKey } from '#shared/utils/water-chemistry'

/** Titles of the groups that hold more than one parameter; a one-parameter chart is titled by its label. */
const GROUP_TITLES: Partial<Record<ChartGroup, string>> = { ammonia: 'Ammonia', hardness: 'Hardness (KH and GH)', oxygen: 'Dissolved oxygen' }
/** The charts a customer sees: the water's basics. */
export const CUSTOMER_CHART_GROUPS: readonly ChartGroup[] = ['temperature', 'ph', 'ammonia', 'hardness']

export interface ChartGroupInfo { id: ChartGroup, title: string, keys: ReadingKey[] }

export const CHART_GROUPS: readonly ChartGroupInfo[] = PARAMETER_LIST.reduce<ChartGroupInfo[]>((out, p) => {
  const g = out.find(x => x.id === p.group)
  if (g) g.keys.push(p.key)
  else out.push({ id: p.group, title: GROUP_TITLES[p.group] ?? p.label, keys: [p.key] })
  return out
}, [])

/** The parameters a customer's charts draw, for the series query. */
export const CUSTOMER_CHART_KEYS: readonly ReadingKey[] = CHART_GROUPS.filter(g => CUSTOMER_CHART_GROUPS.includes(g.id)).flatMap(g => g.keys)

/** The water parameter an alert condition is about ("reading.nitriteMgL", "trend.kh_falling" → "khMgL"), pH when unknown. */
export function parameterOfCondition(condition: string): ReadingKey {
  const [kind, rest = ''] = condition.split('.')
  if (kind === 'reading' && rest in PARAMETER_CATALOGUE) return rest as ReadingKey
  const stem = rest.split('_')[0]?.toLowerCase() ?? ''
  return PARAMETER_LIST.find(p => stem && p.key.toLowerCase().startsWith(stem))?.key ?? 'pH'
}

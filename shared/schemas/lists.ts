import { z } from 'zod'
import { pageQuery } from './common'

/** A list query with a whitelisted sort column and direction. */
export function listQuery<const S extends readonly [string, ...string[]]>(sorts: S) {
  return pageQuery.extend({
    sort: z.enum(sorts, `Sort by one of: ${sorts.join(', ')}`).default(sorts[0] as S[number]),
    dir: z.enum(['asc', 'desc'], 'Use asc or desc').default('asc'),
    status: z.enum(['current', 'archived', 'all'], 'Use current, archived or all').default('current'),
  })
}

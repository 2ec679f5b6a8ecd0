import { z } from 'zod'
import { idParam, pageQuery } from '../../../../shared/schemas/common'
import { localDate } from '../../../../shared/schemas/fields'
import { readerContext } from '../../../services/company'
import { featureReadings, READING_SORTS, readingsCsv } from '../../../services/history'

const query = pageQuery.omit({ q: true }).extend({
  sort: z.enum(READING_SORTS).default('takenAt'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  from: localDate.optional(),
  to: localDate.optional(),
  format: z.enum(['json', 'csv']).default('json'),
})

// A feature's water tests; ?format=csv downloads them (up to 10,000 rows in the range).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  const q = queryAs(event, query)
  if (q.format === 'csv') {
    const { rows } = await featureReadings(user, id, q, true)
    const { unitSystem } = await readerContext(user)
    setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
    setResponseHeader(event, 'content-disposition', `attachment; filename="water-tests-${id}.csv"`)
    return readingsCsv(rows, unitSystem)
  }
  return featureReadings(user, id, q)
})

import { z } from 'zod'
import { idParam } from '../../../../shared/schemas/common'
import { text } from '../../../../shared/schemas/fields'
import { CHART_PARAMETERS, featureSeries, SERIES_RANGES } from '../../../services/chart-data'

const query = z.object({
  range: z.enum(SERIES_RANGES, 'Choose season, year or all').default('year'),
  /** A comma list of parameters; all measured ones when left out. */
  parameters: text(400).optional()
    .transform(s => (s ? [...new Set(s.split(',').map(p => p.trim()).filter(Boolean))] : undefined))
    .pipe(z.array(z.enum(CHART_PARAMETERS, 'Not a chartable parameter')).optional()),
})

// A feature's readings as time series for the trend charts, with its ranges, visits and doses.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  const q = queryAs(event, query)
  return featureSeries(user, id, q)
})

import { z } from 'zod'
import { pageNumber, searchText } from './fields'

/** `:id` route parameters. */
export const idParam = z.object({ id: z.uuid('Not a valid id') })

/** Paged list queries: every list endpoint is paginated. */
export const pageQuery = z.object({
  page: pageNumber.default(1),
  pageSize: z.coerce.number('Page size is a number').int('Page size is a whole number').min(1, 'Page size is at least 1').max(100, 'Page size is at most 100').default(25),
  q: searchText,
})

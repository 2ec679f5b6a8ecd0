import { z } from 'zod'

/** `:id` route parameters. */
export const idParam = z.object({ id: z.uuid('Not a valid id') })

/** Paged list queries: every list endpoint is paginated. */
export const pageQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
  q: z.string().trim().max(100).optional(),
})

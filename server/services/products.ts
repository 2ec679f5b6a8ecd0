import { and, asc, eq, isNull } from 'drizzle-orm'
import type { z } from 'zod'
import type { productSchema, productUpdateSchema } from '../../shared/schemas/visit-record'
import { products } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'

export async function listProducts(actor: SessionUser, includeArchived = false) {
  const rows = await useDb().select().from(products)
    .where(and(eq(products.companyId, actor.companyId), includeArchived ? undefined : isNull(products.archivedAt))).orderBy(asc(products.name)).limit(100)
  return { rows, total: rows.length, page: 1, pageSize: 100 }
}

export async function createProduct(actor: SessionUser, input: z.output<typeof productSchema>, ip: string) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(products).values({ ...input, companyId: actor.companyId }).returning()
    await recordAudit(tx, { action: 'product.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'product', subjectId: row!.id, ip })
    return row!
  })
}

export async function updateProduct(actor: SessionUser, id: string, input: z.output<typeof productUpdateSchema>, ip: string) {
  const { archived, ...fields } = input
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(products).set({ ...fields, ...(archived !== undefined && { archivedAt: archived ? new Date() : null }) })
      .where(and(eq(products.id, id), eq(products.companyId, actor.companyId))).returning()
    if (!row) throw httpError(404, 'No such product')
    await recordAudit(tx, { action: 'product.updated', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'product', subjectId: id, ip, detail: { fields: Object.keys(input) } })
    return row
  })
}

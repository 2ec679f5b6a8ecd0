import { timestamp, uuid } from 'drizzle-orm/pg-core'

/** Primary key shared by every table: a random UUID made by PostgreSQL. */
export const id = () => uuid('id').primaryKey().defaultRandom()

/** created_at / updated_at as timestamptz; updated_at moves on every update through Drizzle. */
export const timestamps = {
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow().$onUpdate(() => new Date()),
}

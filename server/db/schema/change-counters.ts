import { bigint, pgTable, primaryKey, text, uuid } from 'drizzle-orm/pg-core'

// Change counters: a number per (topic, subject) that PostgreSQL triggers raise in the same
// transaction as every write to the rows an answer is computed from
// (drizzle/*change-counters-triggers.sql), so an answer cached under a counter's value is exact
// for as long as the counter keeps that value, on every instance. Never written by the app.
//
// Topics (the subject is a company or a water feature id):
// - 'revenue' (company): its contracts, plans, companies row, and which visits count towards a
//   per-visit contract (the contract figures of the revenue view).
// - 'feature' (water feature): the feature row, its readings and doses, and the finished visits
//   at its site (the trend charts' series).
// - 'ranges' (company): its range profiles and companies row (time zone), which every feature's
//   series also reads.
// - 'invoices' (company): its invoices (the revenue view's receivables and invoiced figures, the
//   invoices table).
// - 'customers' (company): its customers, their contacts, sites and water features, and its
//   companies row (the customers list; the names and places on the invoices table, Today and the
//   schedule board).
// - 'schedule' (company): its visits, staff (users and staff profiles), which features each
//   contract covers, and its companies row (Today and the schedule board).

export const CHANGE_TOPICS = ['revenue', 'feature', 'ranges', 'invoices', 'customers', 'schedule'] as const
export type ChangeTopic = (typeof CHANGE_TOPICS)[number]

export const changeCounters = pgTable('change_counters', {
  topic: text('topic').$type<ChangeTopic>().notNull(),
  subjectId: uuid('subject_id').notNull(),
  version: bigint('version', { mode: 'number' }).notNull(),
}, t => [primaryKey({ name: 'change_counters_pk', columns: [t.topic, t.subjectId] })])

import { bigint, date, doublePrecision, index, integer, pgSequence, pgTable, primaryKey, uuid } from 'drizzle-orm/pg-core'
import { companies } from './companies'
import { users } from './users'

/** Every change to a technician-day's stops takes a new number, so a late write of old driving figures cannot land. */
export const technicianDayLoadVersion = pgSequence('technician_day_load_version')

/**
 * Each technician-day's load, which the week board reads instead of every visit: how many visits
 * count (assigned, not cancelled or skipped) and their minutes, kept exact by PostgreSQL triggers
 * on visits in the same transaction as every write (drizzle/*technician-day-loads-triggers.sql);
 * the app never writes those. The driving is computed with shared/utils/day-load.ts, which
 * PostgreSQL cannot run: the triggers clear it (and take a new version) whenever the day's stops,
 * a stop's site coordinates or the technician's home change, and the board computes and stores it
 * on its next read, only for the version it read.
 */
export const technicianDayLoads = pgTable('technician_day_loads', {
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  technicianId: uuid('technician_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  day: date('day').notNull(),
  visits: integer('visits').notNull(),
  visitMinutes: integer('visit_minutes').notNull(),
  /** Null until computed after the last change of the day's stops. */
  drivingMinutes: doublePrecision('driving_minutes'),
  stopsWithoutPlace: integer('stops_without_place'),
  version: bigint('version', { mode: 'number' }).notNull(),
}, t => [
  primaryKey({ name: 'technician_day_loads_pkey', columns: [t.companyId, t.day, t.technicianId] }),
  index('technician_day_loads_technician_day_idx').on(t.technicianId, t.day),
])

import { relations } from 'drizzle-orm'
import { companies } from './companies'
import { customers } from './customers'
import { sessions, users } from './users'

export const companiesRelations = relations(companies, ({ many }) => ({
  users: many(users),
  customers: many(customers),
}))

export const usersRelations = relations(users, ({ one, many }) => ({
  company: one(companies, { fields: [users.companyId], references: [companies.id] }),
  customer: one(customers, { fields: [users.customerId], references: [customers.id] }),
  sessions: many(sessions),
}))

export const customersRelations = relations(customers, ({ one, many }) => ({
  company: one(companies, { fields: [customers.companyId], references: [companies.id] }),
  logins: many(users),
}))

export const sessionsRelations = relations(sessions, ({ one }) => ({
  user: one(users, { fields: [sessions.userId], references: [users.id] }),
}))

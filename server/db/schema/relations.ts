import { relations } from 'drizzle-orm'
import { companies } from './companies'
import { customerContacts, customers } from './customers'
import { rangeProfiles, waterFeatures } from './features'
import { sites } from './sites'
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
  contacts: many(customerContacts),
  sites: many(sites),
  features: many(waterFeatures),
}))

export const customerContactsRelations = relations(customerContacts, ({ one }) => ({
  customer: one(customers, { fields: [customerContacts.customerId], references: [customers.id] }),
}))

export const sitesRelations = relations(sites, ({ one, many }) => ({
  customer: one(customers, { fields: [sites.customerId], references: [customers.id] }),
  features: many(waterFeatures),
}))

export const waterFeaturesRelations = relations(waterFeatures, ({ one }) => ({
  site: one(sites, { fields: [waterFeatures.siteId], references: [sites.id] }),
  customer: one(customers, { fields: [waterFeatures.customerId], references: [customers.id] }),
  rangeProfile: one(rangeProfiles, { fields: [waterFeatures.rangeProfileId], references: [rangeProfiles.id] }),
}))

export const sessionsRelations = relations(sessions, ({ one }) => ({
  user: one(users, { fields: [sessions.userId], references: [users.id] }),
}))

import { relations } from 'drizzle-orm'
import { companies } from './companies'
import { customerContacts, customers } from './customers'
import { rangeProfiles, waterFeatures } from './features'
import { sites } from './sites'
import { contractFeatures, contracts } from './contracts'
import { planVisitTemplates, plans } from './plans'
import { visits } from './visits'
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

export const plansRelations = relations(plans, ({ many }) => ({
  templates: many(planVisitTemplates),
  contracts: many(contracts),
}))

export const planVisitTemplatesRelations = relations(planVisitTemplates, ({ one }) => ({
  plan: one(plans, { fields: [planVisitTemplates.planId], references: [plans.id] }),
}))

export const contractsRelations = relations(contracts, ({ one, many }) => ({
  customer: one(customers, { fields: [contracts.customerId], references: [customers.id] }),
  plan: one(plans, { fields: [contracts.planId], references: [plans.id] }),
  features: many(contractFeatures),
  visits: many(visits),
}))

export const contractFeaturesRelations = relations(contractFeatures, ({ one }) => ({
  contract: one(contracts, { fields: [contractFeatures.contractId], references: [contracts.id] }),
  feature: one(waterFeatures, { fields: [contractFeatures.featureId], references: [waterFeatures.id] }),
}))

export const visitsRelations = relations(visits, ({ one }) => ({
  contract: one(contracts, { fields: [visits.contractId], references: [contracts.id] }),
  site: one(sites, { fields: [visits.siteId], references: [sites.id] }),
  customer: one(customers, { fields: [visits.customerId], references: [customers.id] }),
  technician: one(users, { fields: [visits.technicianId], references: [users.id] }),
}))

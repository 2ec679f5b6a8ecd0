// Roles and what each may do. Adding a role (e.g. an office dispatcher) means adding it to
// ROLES and listing its permissions below; the server guard and the UI read only this table.
export const ROLES = ['owner', 'technician', 'customer'] as const
export type Role = (typeof ROLES)[number]

export const STAFF_ROLES = ['owner', 'technician'] as const satisfies readonly Role[]

export const PERMISSIONS = {
  'users.manage': ['owner'],
  'settings.manage': ['owner'],
  'audit.read': ['owner'],
  'overview.read': ['owner'],
  'today.read': ['owner', 'technician'],
  'portal.read': ['customer'],
  /** The customer's own tests and preferences. */
  'portal.write': ['customer'],
  /** Customers, sites and features: customers read only their own (enforced in the services). */
  'records.read': ['owner', 'technician', 'customer'],
  'records.edit': ['owner', 'technician'],
  'profiles.manage': ['owner'],
  'water.evaluate': ['owner', 'technician', 'customer'],
  'plans.manage': ['owner'],
  'contracts.manage': ['owner'],
  /** Contracts and visits: customers read only their own (enforced in the services). */
  'contracts.read': ['owner', 'technician', 'customer'],
  'schedule.manage': ['owner'],
  'schedule.read': ['owner', 'technician'],
  'calendar.own': ['owner', 'technician', 'customer'],
  /** Running a visit: the owner, or the technician it is assigned to (checked in the service). */
  'visits.work': ['owner', 'technician'],
  'products.manage': ['owner'],
  /** Invoices: the owner makes and changes them; customers read and pay only their own (enforced in the services). */
  'billing.manage': ['owner'],
  'invoices.read': ['owner', 'customer'],
  'invoices.pay': ['customer'],
  'revenue.read': ['owner'],
  /** Service requests: customers make and read their own; the owner answers them. */
  'requests.create': ['customer'],
  'requests.read': ['owner', 'customer'],
  'requests.manage': ['owner'],
} as const satisfies Record<string, readonly Role[]>

export type Permission = keyof typeof PERMISSIONS

export function can(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role)
}

/** Where each role lands after signing in. */
export const HOME_BY_ROLE: Record<Role, string> = {
  owner: '/',
  technician: '/today',
  customer: '/portal',
}

export const ROLE_LABELS: Record<Role, string> = {
  owner: 'Owner',
  technician: 'Technician',
  customer: 'Customer',
}

// Plans, contracts and visits: the closed sets shared by the schema, the API and the screens.

export const VISIT_TYPES = ['spring_cleanout', 'routine', 'net_install', 'net_cleanout', 'fall_shutdown', 'water_test', 'repair'] as const
export type VisitType = (typeof VISIT_TYPES)[number]

export const VISIT_TYPE_LABELS: Record<VisitType, string> = {
  spring_cleanout: 'Spring clean-out',
  routine: 'Routine maintenance',
  net_install: 'Net install',
  net_cleanout: 'Net clean-out',
  fall_shutdown: 'Fall shutdown',
  water_test: 'Water test only',
  repair: 'Repair',
}

export const BILLING_CADENCES = ['yearly', 'monthly', 'per_visit'] as const
export type BillingCadence = (typeof BILLING_CADENCES)[number]
export const BILLING_CADENCE_LABELS: Record<BillingCadence, string> = {
  yearly: 'Yearly in advance',
  monthly: 'Monthly',
  per_visit: 'Per visit',
}

export const CONTRACT_STATUSES = ['draft', 'active', 'paused', 'ended', 'cancelled'] as const
export type ContractStatus = (typeof CONTRACT_STATUSES)[number]
export const CONTRACT_STATUS_LABELS: Record<ContractStatus, string> = {
  draft: 'Draft', active: 'Active', paused: 'Paused', ended: 'Ended', cancelled: 'Cancelled',
}

export const VISIT_STATUSES = ['scheduled', 'in_progress', 'done', 'skipped', 'cancelled'] as const
export type VisitStatus = (typeof VISIT_STATUSES)[number]
export const VISIT_STATUS_LABELS: Record<VisitStatus, string> = {
  scheduled: 'Scheduled', in_progress: 'Under way', done: 'Done', skipped: 'Skipped', cancelled: 'Cancelled',
}

/** One item of a visit's checklist; `state` is filled in during the visit. */
export interface ChecklistItem {
  label: string
  state?: 'done' | 'not_needed' | 'problem' | null
  note?: string
}

// Service requests: what a customer asks for between visits, and where it stands.

export const REQUEST_KINDS = ['leak', 'green_water', 'fish_problem', 'equipment_fault', 'extra_cleanout', 'other'] as const
export type RequestKind = (typeof REQUEST_KINDS)[number]
export const REQUEST_KIND_LABELS: Record<RequestKind, string> = {
  leak: 'Leak or water loss', green_water: 'Green or cloudy water', fish_problem: 'Fish problem',
  equipment_fault: 'Pump, filter or light fault', extra_cleanout: 'Extra clean-out', other: 'Something else',
}

export const REQUEST_STATUSES = ['new', 'scheduled', 'declined', 'done'] as const
export type RequestStatus = (typeof REQUEST_STATUSES)[number]
export const REQUEST_STATUS_LABELS: Record<RequestStatus, string> = {
  new: 'Waiting for us', scheduled: 'Visit booked', declined: 'Not booked', done: 'Done',
}

/** Photos a customer may attach to one request. */
export const MAX_REQUEST_PHOTOS = 5

import type { FetchError } from 'ofetch'

export interface ApiErrorView {
  message: string
  fields: Record<string, string>
}

/** Turns a failed $fetch into a message and per-field errors (the server's one error shape). */
export function toApiError(err: unknown): ApiErrorView {
  const e = err as FetchError<{ message?: string, statusMessage?: string, data?: { fields?: Record<string, string> } }>
  if (e?.data) {
    return { message: e.data.message || e.data.statusMessage || 'Something went wrong', fields: e.data.data?.fields ?? {} }
  }
  if (e?.name === 'FetchError' && !e.response) {
    return { message: 'No connection to the server. Check the network and try again.', fields: {} }
  }
  return { message: (e as Error)?.message || 'Something went wrong', fields: {} }
}

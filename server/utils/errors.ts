import { createError } from 'h3'

/**
 * The one error shape: `{ statusCode, statusMessage, message, data? }` where `data.fields`
 * maps a field path to its message for validation failures.
 */
export function httpError(statusCode: number, message: string, data?: Record<string, unknown>) {
  return createError({ statusCode, statusMessage: message, message, data })
}

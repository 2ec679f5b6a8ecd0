import { STATUS_CODES } from 'node:http'
import { createError } from 'h3'

/**
 * The one error shape: `{ statusCode, statusMessage, message, data? }` where `message` is the
 * text for people, `statusMessage` the status's standard reason phrase ("Bad Request"), and
 * `data.fields` maps a field path to its message for validation failures. The text goes in
 * `message` only: h3 warns about (and will sanitize) a `statusMessage` that is not plain ASCII.
 */
export function httpError(statusCode: number, message: string, data?: Record<string, unknown>) {
  return createError({ statusCode, statusMessage: STATUS_CODES[statusCode] ?? 'Error', message, data })
}

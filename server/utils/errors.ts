import { createError } from 'h3'
import { ZodError } from 'zod'

/**
 * The one error shape: `{ statusCode, statusMessage, message, data? }` where `data.fields`
 * maps a field path to its message for validation failures.
 */
export function httpError(statusCode: number, message: string, data?: Record<string, unknown>) {
  return createError({ statusCode, statusMessage: message, message, data })
}

export function fieldsOf(err: ZodError): Record<string, string> {
  const fields: Record<string, string> = {}
  for (const issue of err.issues) {
    const key = issue.path.join('.') || '_'
    fields[key] ??= issue.message
  }
  return fields
}

/** Wraps a zod schema for h3's readValidatedBody / getValidatedQuery: failures become a 400 naming the fields. */
export function validator<T>(schema: { safeParse: (v: unknown) => { success: true, data: T } | { success: false, error: ZodError } }, where = 'body') {
  return (value: unknown): T => {
    const parsed = schema.safeParse(value)
    if (!parsed.success) {
      const fields = fieldsOf(parsed.error)
      const names = Object.keys(fields).join(', ')
      throw httpError(400, `Invalid ${where}: ${names} — ${Object.values(fields)[0]}`, { fields })
    }
    return parsed.data
  }
}

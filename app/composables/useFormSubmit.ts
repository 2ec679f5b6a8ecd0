import type { z } from 'zod'

/**
 * The one way forms submit: validate with the shared zod schema (errors in place), send, and on
 * failure show the server's message and its per-field errors. `submit` resolves to the server's
 * answer, or undefined when nothing was saved.
 */
export function useFormSubmit() {
  const fields = ref<Record<string, string>>({})
  const message = ref('')
  const busy = ref(false)

  async function submit<S extends z.ZodType, R>(schema: S, values: unknown, send: (data: z.output<S>) => Promise<R>): Promise<R | undefined> {
    message.value = ''
    const parsed = schema.safeParse(values)
    if (!parsed.success) {
      fields.value = fieldErrors(parsed.error)
      message.value = 'Check the fields marked below.'
      return undefined
    }
    fields.value = {}
    busy.value = true
    try {
      return await send(parsed.data)
    }
    catch (err) {
      const e = toApiError(err)
      message.value = e.message
      fields.value = e.fields
      return undefined
    }
    finally {
      busy.value = false
    }
  }
  return { fields, message, busy, submit }
}

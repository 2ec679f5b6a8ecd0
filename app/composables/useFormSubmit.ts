import type { z } from 'zod'

/**
 * The one way forms submit: validate with the shared zod schema (errors in place), send, and on
 * failure show the server's message and its per-field errors. `submit` resolves to the server's
 * answer, or undefined when nothing was saved.
 *
 * `invalid` carries what the form itself could not read (letters in a number field, by the SI
 * field's path, e.g. `shape.lengthM`): those are shown in place and nothing is sent. A form-level
 * message always points at a field marked on the page; when no field shows its error, the
 * message says what is wrong itself, so a form never fails without saying why.
 */
const CHECK_FIELDS = 'Check the fields marked below.'

export function useFormSubmit() {
  const fields = ref<Record<string, string>>({})
  const message = ref('')
  const busy = ref(false)
  // Once every marked field has been put right, the lead that pointed at them goes too.
  watch(fields, (f) => { if (!Object.keys(f).length && message.value === CHECK_FIELDS) message.value = '' })

  async function pointAtFields(lead: string) {
    const problems = [...new Set(Object.values(fields.value))]
    message.value = lead
    if (!import.meta.client || !problems.length) return
    await nextTick()
    const marked = [...document.querySelectorAll<HTMLElement>('.field-error')].filter(el => el.offsetParent !== null || el.getClientRects().length > 0)
    if (marked.length) {
      marked[0]!.scrollIntoView({ block: 'center' })
      return
    }
    message.value = `Not saved: ${problems.join(' ')}`
  }

  async function submit<S extends z.ZodType, R>(schema: S, values: unknown, send: (data: z.output<S>) => Promise<R>, opts: { invalid?: Record<string, string> } = {}): Promise<R | undefined> {
    message.value = ''
    const typed = Object.fromEntries(Object.entries(opts.invalid ?? {}).filter(([, m]) => m))
    const parsed = schema.safeParse(values)
    if (!parsed.success || Object.keys(typed).length) {
      fields.value = { ...(parsed.success ? {} : fieldErrors(parsed.error)), ...typed }
      await pointAtFields(CHECK_FIELDS)
      return undefined
    }
    fields.value = {}
    busy.value = true
    try {
      return await send(parsed.data)
    }
    catch (err) {
      const e = toApiError(err)
      fields.value = e.fields
      await pointAtFields(e.message)
      return undefined
    }
    finally {
      busy.value = false
    }
  }
  return { fields, message, busy, submit }
}

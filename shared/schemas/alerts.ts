import { z } from 'zod'
import { text } from './fields'

/** Acknowledging or resolving an alert; resolving says what was done. */
export const alertCloseSchema = z.object({
  status: z.enum(['acknowledged', 'resolved'], 'Choose acknowledged or resolved'),
  /** Left out, the alert keeps the note it has. */
  note: text(500).optional(),
}).refine(b => b.status !== 'resolved' || !!b.note, { path: ['note'], message: 'Say what was done' })
export type AlertCloseInput = z.output<typeof alertCloseSchema>

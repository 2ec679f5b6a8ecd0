import type { ReadingStatus } from '#shared/types/water'

/** A water status in words, and the colour that goes with it (always shown together). */
export const READING_STATUS_TEXT: Record<ReadingStatus, string> = { ok: 'In range', watch: 'Watch', act: 'Act today' }
export const READING_STATUS_CLASS: Record<ReadingStatus, string> = { ok: 'bg-reed-100 text-reed-900', watch: 'bg-clay-100 text-clay-900', act: 'bg-alert-500 text-white' }

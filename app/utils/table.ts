import { tableFeatures } from '@tanstack/vue-table'

/** Tables sort, filter and page on the server, so the client needs only TanStack's core features. */
export const serverTableFeatures = tableFeatures({})
export type ServerTableFeatures = typeof serverTableFeatures

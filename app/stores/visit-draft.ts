import { defineStore } from 'pinia'
import type { RecordedDose, RecordedReading } from '#shared/schemas/visit-record'
import type { ChecklistItem } from '#shared/types/schedule'

export interface VisitDraft {
  checklist: Array<ChecklistItem & { note: string }>
  customerNotes: string
  internalNotes: string
  readings: RecordedReading[]
  doses: RecordedDose[]
}

type SaveState = 'saved' | 'saving' | 'waiting' | 'error'

const storageKey = (visitId: string) => `rillbook.visit-draft.${visitId}`

/**
 * The visit being edited, kept in the browser (localStorage) as it is typed so nothing is lost,
 * and sent to the server whole; when the network is gone it waits and retries when it is back.
 * The server takes the same record twice without harm (readings and doses carry their own ids).
 */
export const useVisitDraftStore = defineStore('visit-draft', () => {
  const visitId = ref<string | null>(null)
  const draft = ref<VisitDraft | null>(null)
  const state = ref<SaveState>('saved')
  const message = ref('')
  const dirty = ref(false)
  /** What was typed but cannot be used (letters in a number field), by field key: shown by the field and in the footer, never saved. */
  const problems = ref<Record<string, string>>({})
  let timer: ReturnType<typeof setTimeout> | undefined
  let retryTimer: ReturnType<typeof setInterval> | undefined

  function load(id: string, fromServer: VisitDraft) {
    visitId.value = id
    problems.value = {}
    const kept = import.meta.client ? localStorage.getItem(storageKey(id)) : null
    const local = kept ? JSON.parse(kept) as { draft: VisitDraft, dirty: boolean } : null
    // Unsaved work on this phone wins over the server's copy.
    draft.value = local?.dirty ? local.draft : structuredClone(fromServer)
    dirty.value = !!local?.dirty
    state.value = dirty.value ? 'waiting' : 'saved'
    if (dirty.value) scheduleSave(0)
  }

  function persist() {
    if (import.meta.client && visitId.value && draft.value) localStorage.setItem(storageKey(visitId.value), JSON.stringify({ draft: draft.value, dirty: dirty.value }))
  }

  function changed() {
    dirty.value = true
    // Never "All saved" while a change waits for its send.
    if (state.value === 'saved') state.value = 'saving'
    persist()
    scheduleSave(800)
  }

  function scheduleSave(ms: number) {
    clearTimeout(timer)
    timer = setTimeout(() => { void save() }, ms)
  }

  async function save(): Promise<boolean> {
    if (!visitId.value || !draft.value || !dirty.value) return true
    state.value = 'saving'
    const sent = JSON.stringify(draft.value)
    try {
      await $fetch(`/api/visits/${visitId.value}/record`, { method: 'PUT', body: draft.value })
      if (JSON.stringify(draft.value) === sent) dirty.value = false
      state.value = dirty.value ? 'waiting' : 'saved'
      message.value = ''
      persist()
      if (dirty.value) scheduleSave(300)
      return !dirty.value
    }
    catch (err) {
      const e = toApiError(err)
      const offline = !navigator.onLine || /No connection/.test(e.message)
      state.value = offline ? 'waiting' : 'error'
      message.value = offline ? 'Not saved yet: no connection. Everything stays on this phone and is sent when the network is back.' : e.message
      if (offline) startRetrying()
      return false
    }
  }

  function startRetrying() {
    if (retryTimer || !import.meta.client) return
    retryTimer = setInterval(() => {
      if (navigator.onLine) void save().then((ok) => { if (ok) stopRetrying() })
    }, 5000)
  }
  function stopRetrying() {
    clearInterval(retryTimer)
    retryTimer = undefined
  }
  if (import.meta.client) window.addEventListener('online', () => { if (dirty.value) void save() })

  /** Marks (message) or clears (empty) a field whose text cannot be used; keys starting with `prefix:` all clear with `clearProblems(prefix)`. */
  function setProblem(key: string, text: string) {
    const rest = Object.fromEntries(Object.entries(problems.value).filter(([k]) => k !== key))
    problems.value = text ? { ...rest, [key]: text } : rest
  }
  function clearProblems(prefix: string) {
    problems.value = Object.fromEntries(Object.entries(problems.value).filter(([k]) => !k.startsWith(`${prefix}:`)))
  }

  function forget() {
    if (import.meta.client && visitId.value) localStorage.removeItem(storageKey(visitId.value))
    dirty.value = false
    state.value = 'saved'
  }

  return { visitId, draft, state, message, dirty, problems, load, changed, save, forget, setProblem, clearProblems }
})

import { onScopeDispose, ref, shallowRef } from 'vue'
import { errorMessage } from '@/api/client'

export type SaveStatus =
  | { kind: 'idle' }
  | { kind: 'pending' }
  | { kind: 'saving' }
  | { kind: 'saved'; at: number }
  | { kind: 'invalid'; reason: string }
  | { kind: 'failed'; reason: string }

export interface AutosaveOptions<T> {
  /** The value to store now. */
  snapshot: () => T
  /** Why it cannot be stored as it is (invalid values), or null when it can. */
  blocker: (value: T) => string | null
  save: (value: T) => Promise<void>
  /** Words for a failed save; by default the error's own. */
  describeError?: (error: unknown) => string
  /** Quiet time after the last change before saving. */
  delayMs?: number
  now?: () => number
}

/**
 * Saves a draft a moment after the last change, or at once on `flush` (a field lost focus). Only
 * valid drafts are sent, one request at a time; a change made while one is on its way is sent
 * after it. A failed save keeps everything typed and is tried again on the next change or flush.
 */
export function useAutosave<T>(options: AutosaveOptions<T>) {
  const { delayMs = 1500, now = Date.now, describeError = errorMessage } = options
  const status = shallowRef<SaveStatus>({ kind: 'idle' })
  const unsaved = ref(false)
  let version = 0
  let timer: ReturnType<typeof setTimeout> | undefined
  let inFlight: Promise<void> | null = null
  let again = false

  function changed() {
    version++
    unsaved.value = true
    status.value = { kind: 'pending' }
    clearTimeout(timer)
    timer = setTimeout(() => void run(), delayMs)
  }

  async function store(value: T, sent: number) {
    status.value = { kind: 'saving' }
    try {
      await options.save(value)
      if (sent === version) {
        unsaved.value = false
        status.value = { kind: 'saved', at: now() }
      } else status.value = { kind: 'pending' }
    } catch (e) {
      status.value = { kind: 'failed', reason: describeError(e) }
    }
  }

  async function run(): Promise<void> {
    clearTimeout(timer)
    if (!unsaved.value) return
    if (inFlight) {
      again = true
      return inFlight
    }
    const value = options.snapshot()
    const reason = options.blocker(value)
    if (reason) {
      status.value = { kind: 'invalid', reason }
      return
    }
    inFlight = store(value, version)
    await inFlight
    inFlight = null
    if (again) {
      again = false
      await run()
    }
  }

  onScopeDispose(() => clearTimeout(timer))
  return { status, unsaved, changed, flush: run }
}

/** The status in words, as the page shows it. */
export function saveStatusText(status: SaveStatus, now: number): string {
  switch (status.kind) {
    case 'idle':
      return 'No changes yet'
    case 'pending':
      return 'Unsaved changes'
    case 'saving':
      return 'Saving…'
    case 'saved':
      return `Saved · ${ago(now - status.at)}`
    case 'invalid':
    case 'failed':
      return `Not saved: ${status.reason}`
  }
}

function ago(ms: number): string {
  const minutes = Math.floor(ms / 60_000)
  if (minutes < 1) return 'just now'
  if (minutes < 60) return minutes === 1 ? '1 minute ago' : `${minutes} minutes ago`
  const hours = Math.floor(minutes / 60)
  return hours === 1 ? '1 hour ago' : `${hours} hours ago`
}

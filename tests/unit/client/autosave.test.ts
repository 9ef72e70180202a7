import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope } from 'vue'
import { ApiError } from '@/api/client'
import { saveStatusText, useAutosave } from '@/composables/useAutosave'

interface Doc {
  na: number | string
}

/** An autosaver over a plain object, with a save that can be told to fail or to hang. */
function setup(delayMs = 1500) {
  const doc: Doc = { na: 1.4 }
  const saved: Doc[] = []
  let fail: unknown = null
  let hold: Promise<void> | null = null
  const scope = effectScope()
  const autosave = scope.run(() =>
    useAutosave<Doc>({
      snapshot: () => ({ ...doc }),
      blocker: (d) => (typeof d.na === 'number' ? null : 'Numerical aperture needs fixing'),
      save: async (d) => {
        if (hold) await hold
        if (fail) throw fail
        saved.push(d)
      },
      delayMs,
      now: () => 0,
    }),
  )!
  return {
    doc,
    saved,
    autosave,
    scope,
    failWith: (e: unknown) => (fail = e),
    holdUntil: (p: Promise<void> | null) => (hold = p),
  }
}

beforeEach(() => vi.useFakeTimers())
afterEach(() => vi.useRealTimers())

describe('autosave', () => {
  it('saves once, 1.5 s after the last of several quick changes', async () => {
    const { doc, saved, autosave } = setup()
    doc.na = 1.45
    autosave.changed()
    await vi.advanceTimersByTimeAsync(1000)
    doc.na = 1.49
    autosave.changed()
    await vi.advanceTimersByTimeAsync(1499)
    expect(saved).toEqual([])
    expect(autosave.status.value.kind).toBe('pending')
    await vi.advanceTimersByTimeAsync(1)
    expect(saved).toEqual([{ na: 1.49 }])
    expect(autosave.status.value).toEqual({ kind: 'saved', at: 0 })
    expect(autosave.unsaved.value).toBe(false)
  })

  it('saves at once when a field loses focus, and not again when the timer fires', async () => {
    const { doc, saved, autosave } = setup()
    doc.na = 1.3
    autosave.changed()
    await autosave.flush()
    expect(saved).toEqual([{ na: 1.3 }])
    await vi.advanceTimersByTimeAsync(5000)
    expect(saved).toHaveLength(1)
  })

  it('does nothing on blur when nothing changed', async () => {
    const { saved, autosave } = setup()
    await autosave.flush()
    expect(saved).toEqual([])
    expect(autosave.status.value.kind).toBe('idle')
  })

  it('does not send an invalid document, and says why', async () => {
    const { doc, saved, autosave } = setup()
    doc.na = '1.4x'
    autosave.changed()
    await vi.advanceTimersByTimeAsync(1500)
    expect(saved).toEqual([])
    expect(autosave.status.value).toEqual({
      kind: 'invalid',
      reason: 'Numerical aperture needs fixing',
    })
    expect(autosave.unsaved.value).toBe(true)
    doc.na = 1.4
    autosave.changed()
    await vi.advanceTimersByTimeAsync(1500)
    expect(saved).toEqual([{ na: 1.4 }])
  })

  it('keeps the change unsaved after a failed save and sends it on the next try', async () => {
    const { doc, saved, autosave, failWith } = setup()
    failWith(
      new ApiError({ status: 0, title: 'No connection', detail: 'Stipple could not be reached.' }),
    )
    doc.na = 1.2
    autosave.changed()
    await vi.advanceTimersByTimeAsync(1500)
    expect(autosave.status.value).toEqual({
      kind: 'failed',
      reason: 'Stipple could not be reached.',
    })
    expect(autosave.unsaved.value).toBe(true)
    expect(doc.na).toBe(1.2)
    failWith(null)
    await autosave.flush()
    expect(saved).toEqual([{ na: 1.2 }])
    expect(autosave.unsaved.value).toBe(false)
  })

  it('sends a change made during a save after that save, one request at a time', async () => {
    const { doc, saved, autosave, holdUntil } = setup()
    let release = () => {}
    holdUntil(new Promise<void>((r) => (release = r)))
    doc.na = 1.1
    autosave.changed()
    const first = autosave.flush()
    expect(autosave.status.value.kind).toBe('saving')
    doc.na = 1.25
    autosave.changed()
    const second = autosave.flush()
    holdUntil(null)
    release()
    await Promise.all([first, second])
    expect(saved).toEqual([{ na: 1.1 }, { na: 1.25 }])
    expect(autosave.status.value.kind).toBe('saved')
  })

  it('stops its timer when the page goes away', async () => {
    const { doc, saved, autosave, scope } = setup()
    doc.na = 1.0
    autosave.changed()
    scope.stop()
    await vi.advanceTimersByTimeAsync(5000)
    expect(saved).toEqual([])
  })
})

describe('the save status in words', () => {
  it('ages "Saved · just now" and names the reason when it is not saved', () => {
    expect(saveStatusText({ kind: 'saving' }, 0)).toBe('Saving…')
    expect(saveStatusText({ kind: 'saved', at: 0 }, 59_000)).toBe('Saved · just now')
    expect(saveStatusText({ kind: 'saved', at: 0 }, 60_000)).toBe('Saved · 1 minute ago')
    expect(saveStatusText({ kind: 'saved', at: 0 }, 7_200_000)).toBe('Saved · 2 hours ago')
    expect(saveStatusText({ kind: 'failed', reason: 'the server refused one field' }, 0)).toBe(
      'Not saved: the server refused one field',
    )
  })
})

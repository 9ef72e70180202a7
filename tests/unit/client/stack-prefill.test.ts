import { beforeEach, describe, expect, it, vi } from 'vitest'
import { useStackPrefill } from '@/composables/useStackPrefill'

const api = vi.hoisted(() => ({ getMetadata: vi.fn(), putMetadata: vi.fn() }))
vi.mock('@/api/metadata', () => api)

const stored = { instrument: { objective: { immersion: 'Oil' } }, acquisition: { frames: 5000 } }
beforeEach(() => {
  api.getMetadata.mockReset().mockResolvedValue({ metadata: stored, completeness: null })
  api.putMetadata.mockReset().mockResolvedValue({})
})

describe('using the OME-XML of a stack for the description', () => {
  it('writes the chosen values into the description as stored, and saves it', async () => {
    const saved = vi.fn()
    const prefill = useStackPrefill(1, saved)
    await prefill.review({ metadata: {}, mapped: [], ignored: [] })
    expect(prefill.open.value).toBe(true)
    expect(prefill.current.value).toEqual(stored)
    await prefill.apply([
      { path: 'instrument.objective.lensNA', value: 1.49 },
      { path: 'acquisition.frames', value: 20000 },
    ])
    expect(api.putMetadata).toHaveBeenCalledWith(1, {
      instrument: { objective: { immersion: 'Oil', lensNA: 1.49 } },
      acquisition: { frames: 20000 },
    })
    expect(saved).toHaveBeenCalledOnce()
    expect(prefill.notice.value?.text).toBe('2 fields of the description filled from the stack.')
  })

  it('saves nothing the shared schema rejects, and says which field', async () => {
    const prefill = useStackPrefill(1, vi.fn())
    // NA 1.7 is above what oil immersion allows (the schema's immersion bound).
    await prefill.apply([{ path: 'instrument.objective.lensNA', value: 1.7 }])
    expect(api.putMetadata).not.toHaveBeenCalled()
    expect(prefill.notice.value?.type).toBe('error')
    expect(prefill.notice.value?.text).toContain('Numerical aperture (NA)')
  })
})

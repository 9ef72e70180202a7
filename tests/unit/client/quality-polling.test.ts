import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope, nextTick, ref } from 'vue'
import { ApiError } from '@/api/client'
import { QUALITY_POLL_MS, useQualityReport } from '@/composables/useQualityReport'
import {
  doneReport,
  failedReport,
  queuedReport,
  runningReport,
} from '../../fixtures/quality-report'

const api = vi.hoisted(() => ({ getQuality: vi.fn() }))
vi.mock('@/api/quality', () => ({ getQuality: api.getQuality }))

beforeEach(() => {
  vi.useFakeTimers()
  api.getQuality.mockReset()
})
afterEach(() => vi.useRealTimers())

describe('the quality report while it is computed', () => {
  it('asks every 1.5 s while queued or running, and stops once done', async () => {
    api.getQuality
      .mockResolvedValueOnce(queuedReport)
      .mockResolvedValueOnce(runningReport)
      .mockResolvedValue(doneReport)
    const scope = effectScope()
    const q = scope.run(() => useQualityReport('STPL-000001', 8))!
    await vi.advanceTimersByTimeAsync(0)
    expect(api.getQuality).toHaveBeenCalledWith('STPL-000001', 8)
    expect(q.report.value?.status).toBe('queued')
    expect(q.pending.value).toBe(true)
    await vi.advanceTimersByTimeAsync(QUALITY_POLL_MS)
    expect(q.report.value?.progress).toBe(0.42)
    await vi.advanceTimersByTimeAsync(QUALITY_POLL_MS)
    expect(q.report.value?.status).toBe('done')
    expect(q.pending.value).toBe(false)
    await vi.advanceTimersByTimeAsync(20_000)
    expect(api.getQuality).toHaveBeenCalledTimes(3)
    scope.stop()
  })

  it('stops when the report failed, and when a request fails', async () => {
    api.getQuality.mockResolvedValueOnce(runningReport).mockResolvedValue(failedReport)
    const scope = effectScope()
    const q = scope.run(() => useQualityReport(1, 8))!
    await vi.advanceTimersByTimeAsync(QUALITY_POLL_MS * 5)
    expect(api.getQuality).toHaveBeenCalledTimes(2)
    expect(q.report.value?.error).toBe('The localization store could not be read.')
    scope.stop()

    api.getQuality.mockReset()
    const refused = new ApiError({ status: 403, title: 'Forbidden' })
    api.getQuality.mockResolvedValueOnce(runningReport).mockRejectedValue(refused)
    const again = effectScope()
    const r = again.run(() => useQualityReport(1, 8))!
    await vi.advanceTimersByTimeAsync(QUALITY_POLL_MS * 5)
    expect(api.getQuality).toHaveBeenCalledTimes(2)
    expect(r.error.value).toBe(refused)
    again.stop()
  })

  it('stops when the page goes away, and starts again for another file', async () => {
    api.getQuality.mockResolvedValue(runningReport)
    const fileId = ref(8)
    const scope = effectScope()
    scope.run(() => useQualityReport(1, fileId))
    await vi.advanceTimersByTimeAsync(QUALITY_POLL_MS)
    expect(api.getQuality).toHaveBeenCalledTimes(2)
    fileId.value = 9
    await nextTick()
    await vi.advanceTimersByTimeAsync(0)
    expect(api.getQuality).toHaveBeenLastCalledWith(1, 9)
    const calls = api.getQuality.mock.calls.length
    scope.stop()
    await vi.advanceTimersByTimeAsync(QUALITY_POLL_MS * 10)
    expect(api.getQuality).toHaveBeenCalledTimes(calls)
  })
})

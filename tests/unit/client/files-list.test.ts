import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope, nextTick, ref } from 'vue'
import type { DatasetFileDto, FilesAnswer } from '@/api/files'
import { useDatasetFiles } from '@/composables/useDatasetFiles'
import { useUnfinishedUploads } from '@/composables/useUnfinishedUploads'

const api = vi.hoisted(() => ({
  listFiles: vi.fn(),
  storedUploads: vi.fn(),
  serverOffset: vi.fn(),
  forgetStored: vi.fn(async () => {}),
  discardUpload: vi.fn(async () => {}),
}))
vi.mock('@/api/files', () => ({ listFiles: api.listFiles }))
vi.mock('@/api/uploads', () => ({
  storedUploads: api.storedUploads,
  serverOffset: api.serverOffset,
  forgetStored: api.forgetStored,
  discardUpload: api.discardUpload,
}))

const table = (status: DatasetFileDto['status']): DatasetFileDto => ({
  ...{ id: 1, name: 'spots.csv', size: 10, sha256: null, kind: 'localization_table', status },
  ...{ mediaType: null, problem: null, summary: null, createdAt: '2026-01-01T00:00:00Z' },
  job: status === 'processing' ? { state: 'running', progress: 0.5, message: 'parsing' } : null,
})
const answer = (status: DatasetFileDto['status']): FilesAnswer => ({
  items: [table(status)],
  uploadsInProgress: [],
})

beforeEach(() => {
  vi.useFakeTimers()
  Object.values(api).forEach((f) => f.mockReset())
})
afterEach(() => vi.useRealTimers())

describe('the file list', () => {
  it('asks again every 1.5 s while a file is processed, and stops when none is', async () => {
    api.listFiles
      .mockResolvedValueOnce(answer('processing'))
      .mockResolvedValueOnce(answer('processing'))
      .mockResolvedValue(answer('ready'))
    const scope = effectScope()
    const files = scope.run(() => useDatasetFiles(1, true))!
    await vi.advanceTimersByTimeAsync(0)
    expect(api.listFiles).toHaveBeenCalledTimes(1)
    expect(files.processing.value).toBe(true)
    await vi.advanceTimersByTimeAsync(1500)
    expect(api.listFiles).toHaveBeenCalledTimes(2)
    await vi.advanceTimersByTimeAsync(1500)
    expect(api.listFiles).toHaveBeenCalledTimes(3)
    expect(files.files.value[0]?.status).toBe('ready')
    await vi.advanceTimersByTimeAsync(10_000)
    expect(api.listFiles).toHaveBeenCalledTimes(3)
    scope.stop()
  })

  it('stops polling when the tab closes and when the page goes away', async () => {
    api.listFiles.mockResolvedValue(answer('processing'))
    const open = ref(true)
    const scope = effectScope()
    scope.run(() => useDatasetFiles(1, open))
    await vi.advanceTimersByTimeAsync(1500)
    expect(api.listFiles).toHaveBeenCalledTimes(2)
    open.value = false
    await nextTick()
    await vi.advanceTimersByTimeAsync(6000)
    expect(api.listFiles).toHaveBeenCalledTimes(2)
    open.value = true
    await vi.advanceTimersByTimeAsync(0)
    expect(api.listFiles).toHaveBeenCalledTimes(3)
    scope.stop()
    await vi.advanceTimersByTimeAsync(6000)
    expect(api.listFiles).toHaveBeenCalledTimes(3)
  })
})

describe('unfinished uploads after a reload', () => {
  it('lists the server’s and the browser’s, with the offset, and matches a chosen file', async () => {
    api.storedUploads.mockResolvedValue([
      { uploadId: 'u2', name: 'beads.tif', size: 4000 },
      { uploadId: 'old', name: 'gone.csv', size: 10 },
    ])
    api.serverOffset.mockImplementation(async (id: string) =>
      id === 'u1' ? 250 : id === 'u2' ? 1000 : 'gone',
    )
    const active = ref(new Set(['live']))
    const unfinished = useUnfinishedUploads('STPL-000005', active)
    await unfinished.refresh([
      { uploadId: 'u1', name: 'run.tif', size: 1000, startedAt: '2026-01-01T00:00:00Z' },
      { uploadId: 'live', name: 'now.tif', size: 5, startedAt: '2026-01-01T00:00:00Z' },
    ])
    expect(unfinished.list.value).toEqual([
      { uploadId: 'u1', name: 'run.tif', size: 1000, offset: 250 },
      { uploadId: 'u2', name: 'beads.tif', size: 4000, offset: 1000 },
    ])
    // The running upload is never asked about: a HEAD would take its lock on the server.
    expect(api.serverOffset.mock.calls.map((c) => c[0])).toEqual(['u1', 'u2', 'old'])
    expect(api.forgetStored).toHaveBeenCalledWith('old')
    expect(unfinished.matchFor(new File([new Uint8Array(1000)], 'run.tif'))).toBe('u1')
    expect(unfinished.matchFor(new File([new Uint8Array(999)], 'run.tif'))).toBeUndefined()
    await unfinished.discard('u2')
    expect(api.discardUpload).toHaveBeenCalledWith('u2')
    expect(unfinished.list.value.map((u) => u.uploadId)).toEqual(['u1'])
  })
})

import { beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope } from 'vue'
import { useUploadQueue, type UploadQueueOptions } from '@/composables/useUploadQueue'

const { FakeUpload } = vi.hoisted(() => {
  /** Stands in for tus-js-client's Upload: records what the queue asks of it. */
  class FakeUpload {
    static made: FakeUpload[] = []
    static previous: {
      metadata: Record<string, string>
      uploadUrl: string
      creationTime: string
    }[] = []
    started = 0
    aborts: (boolean | undefined)[] = []
    resumedFrom: unknown = null
    url: string | null = null
    constructor(
      readonly file: File,
      readonly options: Record<string, (...args: never[]) => unknown> & {
        uploadUrl?: string | null
        metadata?: Record<string, string>
      },
    ) {
      FakeUpload.made.push(this)
    }
    start() {
      this.started++
    }
    abort(terminate?: boolean) {
      this.aborts.push(terminate)
      return Promise.resolve()
    }
    findPreviousUploads() {
      return Promise.resolve(FakeUpload.previous.map((p) => ({ ...p, urlStorageKey: 'k' })))
    }
    resumeFromPreviousUpload(p: unknown) {
      this.resumedFrom = p
    }
    // What the server would make tus-js-client report.
    progress(sent: number) {
      this.options.onProgress?.(sent as never, this.file.size as never)
    }
    succeed(fileId: number) {
      const lastResponse = {
        getHeader: (h: string) => (h === 'Stipple-File-Id' ? String(fileId) : ''),
      }
      this.options.onSuccess?.({ lastResponse } as never)
    }
    fail(status: number, body: string) {
      const originalResponse = status ? { getStatus: () => status, getBody: () => body } : null
      this.options.onError?.(Object.assign(new Error('tus: failed'), { originalResponse }) as never)
    }
    headAnswer(offset: number) {
      const req = { getMethod: () => 'HEAD' }
      const res = { getStatus: () => 200, getHeader: () => String(offset) }
      this.options.onAfterResponse?.(req as never, res as never)
    }
  }
  return { FakeUpload }
})

vi.mock('tus-js-client', () => ({
  Upload: FakeUpload,
  defaultOptions: { urlStorage: { findAllUploads: async () => [], removeUpload: async () => {} } },
}))

const file = (name: string, size = 1000) => new File([new Uint8Array(size)], name)
let clock = 0
function queue(extra: Partial<UploadQueueOptions> = {}) {
  return effectScope().run(() =>
    useUploadQueue({ dataset: () => 'STPL-000005', now: () => clock, ...extra }),
  )!
}
const settle = () => new Promise((r) => setTimeout(r, 0))

beforeEach(() => {
  FakeUpload.made = []
  FakeUpload.previous = []
  clock = 0
})

describe('the upload queue', () => {
  it('sends two files at a time and starts the next when one is done', async () => {
    const finished = vi.fn()
    const q = queue({ onFinished: finished })
    q.add([file('a.csv'), file('b.csv'), file('c.csv')])
    await settle()
    expect(q.items.map((i) => i.state)).toEqual(['uploading', 'uploading', 'queued'])
    expect(FakeUpload.made.map((u) => u.options.metadata)).toEqual([
      { dataset: 'STPL-000005', filename: 'a.csv' },
      { dataset: 'STPL-000005', filename: 'b.csv' },
    ])
    FakeUpload.made[0]!.succeed(41)
    await settle()
    expect(q.items[0]).toMatchObject({ state: 'done', fileId: 41, sent: 1000 })
    expect(finished).toHaveBeenCalledOnce()
    expect(q.items[2]!.state).toBe('uploading')
  })

  it('pauses without deleting, frees the slot, and resumes the same upload', async () => {
    const q = queue()
    q.add([file('a.csv'), file('b.csv'), file('c.csv')])
    await settle()
    const first = FakeUpload.made[0]!
    await q.pause(q.items[0]!.key)
    await settle()
    // abort() without `true` keeps the bytes on the server (tus: no termination).
    expect(first.aborts).toEqual([undefined])
    expect(q.items.map((i) => i.state)).toEqual(['paused', 'uploading', 'uploading'])
    q.resume(q.items[0]!.key)
    expect(q.items[0]!.state).toBe('queued')
    FakeUpload.made[1]!.succeed(7)
    await settle()
    expect(q.items[0]!.state).toBe('uploading')
    // The same Upload object starts again, so tus asks the server's offset and continues there.
    expect(FakeUpload.made).toHaveLength(3)
    expect(first.started).toBe(2)
  })

  it('cancels with tus termination, and a queued file without touching the server', async () => {
    const q = queue({ parallel: 1 })
    q.add([file('a.csv'), file('b.csv')])
    await settle()
    await q.cancel(q.items[1]!.key)
    expect(q.items[1]!.state).toBe('cancelled')
    expect(FakeUpload.made).toHaveLength(1)
    await q.cancel(q.items[0]!.key)
    expect(FakeUpload.made[0]!.aborts).toEqual([true])
    expect(q.items[0]!.state).toBe('cancelled')
    q.dismiss(q.items[0]!.key)
    expect(q.items).toHaveLength(1)
  })

  it('reports speed and time left from the progress events (10 MB/s simulated)', async () => {
    const q = queue()
    q.add([file('big.tif', 100_000_000)])
    await settle()
    const upload = FakeUpload.made[0]!
    // A link at exactly 10 MB/s reporting every 100 ms: the known truth the meter must find.
    for (let t = 0; t <= 3000; t += 100) {
      clock = t
      upload.progress(t * 10_000)
    }
    const item = q.items[0]!
    expect(item.bytesPerSecond).toBeCloseTo(10_000_000, 6)
    // 30 MB sent, 70 MB to go at 10 MB/s.
    expect(item.secondsLeft).toBeCloseTo(7, 6)
  })

  it('says why the server refused, in its own words', async () => {
    const q = queue()
    q.add([file('a.tif'), file('same.csv'), file('c.csv')])
    await settle()
    const quota = {
      type: '/problems/upload',
      title: 'Project quota exceeded',
      status: 413,
      detail: 'This file (1.00 GiB) would take the project to 51.00 GiB, over its quota of 50 GiB.',
    }
    FakeUpload.made[0]!.fail(413, JSON.stringify(quota))
    const duplicate = {
      type: '/problems/duplicate-file',
      title: 'Duplicate file',
      status: 400,
      detail: 'This file is identical (same SHA-256) to "run1.csv", already in the dataset.',
      existingFileId: 12,
    }
    FakeUpload.made[1]!.fail(400, JSON.stringify(duplicate))
    await settle()
    expect(q.items[0]).toMatchObject({ state: 'refused', message: quota.detail })
    expect(q.items[1]).toMatchObject({ state: 'duplicate', fileId: 12, message: duplicate.detail })
    FakeUpload.made[2]!.fail(0, '')
    expect(q.items[2]!.state).toBe('interrupted')
    expect(q.items[2]!.message).toContain('Resume')
    q.resume(q.items[2]!.key)
    expect(q.items[2]!.state).toBe('uploading')
  })

  it('continues a stored upload of the same dataset and shows where the server was', async () => {
    FakeUpload.previous = [
      {
        metadata: { dataset: 'STPL-000099' },
        uploadUrl: '/api/uploads/other',
        creationTime: '2026-01-02',
      },
      {
        metadata: { dataset: 'STPL-000005' },
        uploadUrl: '/api/uploads/mine',
        creationTime: '2026-01-01',
      },
    ]
    const q = queue()
    q.add([file('run.tif', 4000)])
    await settle()
    const upload = FakeUpload.made[0]!
    expect(upload.resumedFrom).toMatchObject({ uploadUrl: '/api/uploads/mine' })
    upload.headAnswer(3000)
    expect(q.items[0]).toMatchObject({ resumedFrom: 3000, sent: 3000 })
  })

  it('continues an upload the server lists when the same file is chosen again', async () => {
    const q = queue({ resumeIdFor: (f) => (f.name === 'run.tif' ? 'abc123' : undefined) })
    q.add([file('run.tif'), file('new.tif')])
    await settle()
    expect(FakeUpload.made.map((u) => u.options.uploadUrl)).toEqual(['/api/uploads/abc123', null])
  })
})

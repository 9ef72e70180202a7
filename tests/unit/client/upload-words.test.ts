import { describe, expect, it } from 'vitest'
import { formatBytes, formatDuration, formatRate, percentOf } from '@/utils/byteUnits'
import { TransferRate } from '@/utils/transferRate'
import { refusalOf } from '@/utils/uploadRefusal'

const answered = (status: number, body: string) => ({
  originalResponse: { getStatus: () => status, getBody: () => body },
})

describe('refusal messages from the server’s answers', () => {
  it('shows a problem’s detail as written', () => {
    const body = JSON.stringify({
      type: '/problems/upload',
      title: 'Not allowed',
      status: 403,
      detail:
        'Files can be added to STPL-000003 only by its project’s depositors while it is a draft.',
    })
    expect(refusalOf(answered(403, body))).toEqual({
      kind: 'refused',
      status: 403,
      message:
        'Files can be added to STPL-000003 only by its project’s depositors while it is a draft.',
      existingFileId: null,
    })
  })

  it('names the file a duplicate is identical to', () => {
    const body = JSON.stringify({
      type: '/problems/duplicate-file',
      title: 'Duplicate file',
      status: 400,
      detail: 'This file is identical (same SHA-256) to "run1.csv", already in the dataset.',
      existingFileId: 12,
    })
    expect(refusalOf(answered(400, body))).toMatchObject({ kind: 'duplicate', existingFileId: 12 })
  })

  it('puts a plain-text size refusal (the tus server’s own 413) in words', () => {
    const refusal = refusalOf(answered(413, 'Maximum size exceeded\n'))
    expect(refusal).toMatchObject({ kind: 'refused', status: 413 })
    expect(refusal.message).toBe('The file is larger than the server accepts.')
  })

  it('treats no answer and server failures as interruptions to resume', () => {
    expect(refusalOf(new Error('tus: failed to upload chunk'))).toMatchObject({
      kind: 'interrupted',
      status: 0,
    })
    expect(refusalOf({ originalResponse: null }).kind).toBe('interrupted')
    expect(refusalOf(answered(503, '')).message).toContain('(503)')
  })
})

describe('sizes, speeds and durations in words', () => {
  it('uses IEC binary units for sizes (IEC 80000-13)', () => {
    // DOMAIN.md: a 512×512×16-bit stack of 20 000 frames is 10 485 760 000 bytes = 9.77 GiB.
    expect(formatBytes(10_485_760_000)).toBe('9.77 GiB')
    expect(formatBytes(1023)).toBe('1023 bytes')
    expect(formatBytes(1024)).toBe('1.00 KiB')
    expect(formatBytes(16 * 1024 * 1024)).toBe('16.0 MiB')
  })

  it('gives speeds in decimal MB/s (SI) and durations at a glance', () => {
    // DOMAIN.md gives the same stack as 10.49 GB: decimal megabytes are 10⁶ bytes.
    expect(formatRate(10_485_760)).toBe('10.5 MB/s')
    expect(formatRate(250_000)).toBe('0.25 MB/s')
    expect(formatDuration(45)).toBe('45 s')
    expect(formatDuration(200)).toBe('3 min 20 s')
    expect(formatDuration(7500)).toBe('2 h 5 min')
    expect(formatDuration(0.2)).toBe('less than a second')
  })

  it('never shows 100 % before the last byte', () => {
    expect(percentOf(999, 1000)).toBe(99)
    expect(percentOf(1000, 1000)).toBe(100)
    expect(percentOf(0, 0)).toBe(0)
  })
})

describe('the speed meter', () => {
  it('follows a link that slows down within its window', () => {
    const rate = new TransferRate(5_000)
    let bytes = 0
    // Simulated link: 20 MB/s for 10 s, then 5 MB/s; reports every 250 ms.
    for (let t = 0; t <= 20_000; t += 250) {
      rate.add(bytes, t)
      bytes += (t < 10_000 ? 20e6 : 5e6) / 4
    }
    expect(rate.bytesPerSecond()).toBeCloseTo(5e6, 0)
  })

  it('knows nothing until the reports span long enough, and forgets on reset', () => {
    const rate = new TransferRate()
    rate.add(0, 0)
    rate.add(1e6, 100)
    expect(rate.bytesPerSecond()).toBeNull()
    expect(rate.secondsLeft(1e7)).toBeNull()
    rate.add(4e6, 1000)
    expect(rate.bytesPerSecond()).toBeCloseTo(4e6, 6)
    expect(rate.secondsLeft(1e7)).toBeCloseTo(1.5, 6)
    rate.reset()
    expect(rate.bytesPerSecond()).toBeNull()
  })
})

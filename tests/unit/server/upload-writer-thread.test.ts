// @vitest-environment node
import { createHash, randomBytes } from 'node:crypto'
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { afterAll, describe, expect, it } from 'vitest'
import { UploadWriterThread } from '@server/modules/uploads/upload-writer-thread'

const dir = mkdtempSync(join(tmpdir(), 'stipple-writer-'))
const thread = new UploadWriterThread()
afterAll(async () => {
  await thread.shutdown()
  rmSync(dir, { recursive: true, force: true })
})

/** Network-like pieces: odd sizes, so block edges never line up with them. */
function* pieces(data: Buffer) {
  for (let at = 0, n = 0; at < data.length; n++) {
    const size = 1 + ((n * 7919) % 200_000)
    yield data.subarray(at, at + size)
    at += size
  }
}

async function writeThrough(id: string, data: Buffer, from = 0) {
  const path = join(dir, id)
  if (from === 0) writeFileSync(path, '')
  await thread.rehash(id, path, from)
  const writer = thread.writer(id, path, from)
  await pipeline(Readable.from(pieces(data.subarray(from))), writer)
  return { path, written: writer.written }
}

// The reference is node:crypto's own SHA-256 over the same bytes, in one call.
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex')

describe('the upload writer thread and its shared block pool', () => {
  it('writes and hashes more than the whole pool holds, two uploads at once, in order', async () => {
    // 16 blocks of 4 MiB are shared; 90 MiB per upload makes each wait for blocks to come back.
    const a = randomBytes(90 * 1024 * 1024 + 13)
    const b = randomBytes(70 * 1024 * 1024 + 1)
    const [wa, wb] = await Promise.all([writeThrough('a', a), writeThrough('b', b)])
    expect(wa.written).toBe(a.length)
    expect(wb.written).toBe(b.length)
    expect(readFileSync(wa.path).equals(a)).toBe(true)
    expect(readFileSync(wb.path).equals(b)).toBe(true)
    expect(await thread.digest('a')).toBe(sha256(a))
    expect(await thread.digest('b')).toBe(sha256(b))
  })

  it('continues a hash from the bytes already on disk when a later request resumes', async () => {
    const data = randomBytes(9 * 1024 * 1024 + 7)
    const cut = 5 * 1024 * 1024 + 3
    await writeThrough('c', data.subarray(0, cut))
    await thread.drop('c') // as after a restart: the running hash is gone
    const { path } = await writeThrough('c', data, cut)
    expect(readFileSync(path).equals(data)).toBe(true)
    expect(await thread.digest('c')).toBe(sha256(data))
  })

  it('starts afresh after the last writer let the pool go', async () => {
    const data = randomBytes(6 * 1024 * 1024)
    await writeThrough('d', data)
    expect(await thread.digest('d')).toBe(sha256(data))
  })
})

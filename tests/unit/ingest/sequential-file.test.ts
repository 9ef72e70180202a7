// @vitest-environment node
/**
 * The store's direct-I/O writer (sequential-file.writer.ts): the file it leaves must hold exactly
 * the bytes appended, whatever block boundaries they cross, cut to its true length; a write
 * refused midway goes on through the page cache.
 * And the ingest writes the same store through it as through the page cache, byte for byte.
 */
import { readFileSync, statSync } from 'node:fs'
import { open } from 'node:fs/promises'
import { afterAll, afterEach, describe, expect, it, vi } from 'vitest'
import { ingestLocalizationTable } from '@server/compute/ingest'
import { BLOCK_BYTES, SequentialFile } from '@server/compute/store/sequential-file.writer'
import { FXYP, seeded, tempDir } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())
afterEach(() => vi.restoreAllMocks())

/** Pieces of random bytes and sizes (1 byte to 1.5 blocks), some of them Uint16 to narrow. */
function pieces(seed: number, total: number) {
  const random = seeded(seed)
  const out: { values: Uint8Array | Uint16Array; narrow: boolean }[] = []
  for (let size = 0; size < total;) {
    const n = 1 + Math.floor(random() ** 3 * 1.5 * BLOCK_BYTES)
    const narrow = random() < 0.2
    const values = narrow ? new Uint16Array(n) : new Uint8Array(n)
    for (let i = 0; i < n; i++) values[i] = Math.floor(random() * 256)
    out.push({ values, narrow })
    size += n
  }
  return out
}

/** What the file must hold: the bytes, and each narrowed value as one byte. */
function expected(parts: ReturnType<typeof pieces>) {
  return Buffer.concat(parts.map((p) => Uint8Array.from(p.values)))
}

async function writeAll(path: string, parts: ReturnType<typeof pieces>) {
  const out = await SequentialFile.createDirect(path)
  if (!out) throw new Error(`${tmp.dir} takes no direct I/O: the test needs a disk-backed tmpdir`)
  for (const p of parts) await out.append(p.values, p.narrow ? 'uint8' : undefined)
  return { out, length: await out.close() }
}

describe('SequentialFile', () => {
  it('leaves exactly the bytes appended, across blocks, cut to their length', async () => {
    const parts = pieces(11, 2.6 * BLOCK_BYTES + 1234)
    const path = tmp.path('sequential.bin')
    const { out, length } = await writeAll(path, parts)
    const want = expected(parts)
    expect(out.isDirect).toBe(true)
    expect(length).toBe(want.length)
    expect(statSync(path).size).toBe(want.length)
    expect(readFileSync(path).equals(want)).toBe(true)
  })

  it('writes a file shorter than one block, and an empty one', async () => {
    for (const [i, total] of [7, 0].entries()) {
      const parts = total ? pieces(3, total) : []
      const path = tmp.path(`short${i}.bin`)
      const { length } = await writeAll(path, parts)
      expect(length).toBe(expected(parts).length)
      expect(readFileSync(path).equals(expected(parts))).toBe(true)
    }
  })

  it('goes on through the page cache when a direct write is refused midway', async () => {
    const probe = await open(tmp.path('probe.bin'), 'w')
    const handleProto = Object.getPrototypeOf(probe) as { write: (...a: unknown[]) => unknown }
    await probe.close()
    const realWrite = handleProto.write
    let refused = 0
    vi.spyOn(handleProto, 'write').mockImplementation(function (this: unknown, ...args) {
      // The second block's first try: as a file system refusing direct I/O would answer.
      if (args[3] === BLOCK_BYTES && refused === 0) {
        refused++
        return Promise.reject(Object.assign(new Error('EINVAL'), { code: 'EINVAL' }))
      }
      return realWrite.apply(this, args)
    })
    const parts = pieces(5, 3.2 * BLOCK_BYTES)
    const path = tmp.path('refused.bin')
    const { out, length } = await writeAll(path, parts)
    expect(refused).toBe(1)
    expect(out.isDirect).toBe(false)
    expect(length).toBe(expected(parts).length)
    expect(readFileSync(path).equals(expected(parts))).toBe(true)
  })
})

describe('the ingest through it', () => {
  it('writes the same store as through the page cache, byte for byte', async () => {
    const random = seeded(29)
    const lines = ['frame,x,y,photons']
    for (let i = 0; i < 60_000; i++)
      lines.push(
        `${1 + (i >> 6)},${(random() * 30_000).toFixed(2)},${(random() * 30_000).toFixed(2)},${(100 + random() * 5000).toFixed(1)}`,
      )
    const sourcePath = tmp.file('direct.csv', `${lines.join('\n')}\n`)
    const created = vi.spyOn(SequentialFile, 'createDirect')
    const run = (name: string, directWrites?: boolean) =>
      ingestLocalizationTable({
        sourcePath,
        outputPath: tmp.path(name),
        mapping: FXYP,
        tuning: { workers: 2, chunkBytes: 256 << 10, directWrites },
      })
    await run('buffered.arrow', false)
    expect(created).not.toHaveBeenCalled()
    await run('direct.arrow')
    expect(await created.mock.results[0]!.value).not.toBeNull()
    const [a, b] = ['buffered.arrow', 'direct.arrow'].map((n) => readFileSync(tmp.path(n)))
    expect(b!.length).toBe(a!.length)
    expect(b!.equals(a!)).toBe(true)
  })
})

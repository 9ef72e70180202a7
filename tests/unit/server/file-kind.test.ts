// @vitest-environment node
/**
 * What a deposited file is, told from its first bytes: from a file on disk (the embedded default)
 * and from the first 64 KiB alone (an object in the bucket, read with one ranged request) the same
 * answer. The signatures are the formats' own: TIFF's byte-order mark and 42 (TIFF 6.0, BigTIFF
 * 43), gzip's 1f 8b (RFC 1952), an XML declaration.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { gzipSync } from 'node:zlib'
import { afterAll, describe, expect, it } from 'vitest'
import { detectFileKind, fileKindOfHead, SNIFF_BYTES } from '@server/modules/files/file-kind'
import { omeStandardFile } from '../../fixtures/ome-standard'
import { writeTiffStack } from '../../fixtures/tiff-writer'

const dir = mkdtempSync(join(tmpdir(), 'file-kind-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

// A table far longer than what is sniffed, so the gzip head is a truncated stream.
const table = `frame,x_nm,y_nm,photons\n${Array.from(
  { length: 20_000 },
  (_, i) => `${i % 500},${(i * 7.3) % 9000},${(i * 3.1) % 9000},${1000 + (i % 800)}`,
).join('\n')}\n`

const files: Record<
  string,
  { name: string; bytes: () => Buffer; kind: string; mediaType: string }
> = {
  'a TIFF stack': {
    name: 'stack.tif',
    bytes: () => {
      const path = join(dir, 'stack-source.tif')
      writeTiffStack(path, {
        width: 16,
        height: 8,
        frames: 3,
        pixels: (f) => new Array(128).fill(f),
      })
      return readFileSync(path)
    },
    kind: 'raw_stack',
    mediaType: 'image/tiff',
  },
  'a CSV table': {
    name: 'locs.csv',
    bytes: () => Buffer.from(table),
    kind: 'localization_table',
    mediaType: 'text/csv',
  },
  'a gzip table longer than the sniffed bytes': {
    name: 'locs.csv.gz',
    bytes: () => gzipSync(Buffer.from(table.repeat(8)), { level: 1 }),
    kind: 'localization_table',
    mediaType: 'application/gzip',
  },
  'OME-XML': {
    name: 'meta.ome.xml',
    bytes: () => readFileSync(omeStandardFile('minimum-specification.ome.xml')),
    kind: 'metadata',
    mediaType: 'application/xml',
  },
  'binary bytes': {
    name: 'blob.bin',
    bytes: () => Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 37) % 256)),
    kind: 'other',
    mediaType: 'application/octet-stream',
  },
}

describe('telling a file by its first bytes', () => {
  for (const [what, f] of Object.entries(files))
    it(`knows ${what} alike from the file and from its first ${SNIFF_BYTES / 1024} KiB`, async () => {
      const bytes = f.bytes()
      const path = join(dir, f.name)
      writeFileSync(path, bytes)
      const fromFile = await detectFileKind(path, f.name)
      expect(fromFile).toEqual({ kind: f.kind, mediaType: f.mediaType })
      expect(fileKindOfHead(bytes.subarray(0, SNIFF_BYTES), f.name)).toEqual(fromFile)
    })
})

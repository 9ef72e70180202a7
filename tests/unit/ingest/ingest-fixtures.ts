/** Shared helpers for the ingest tests: temp files, a seeded generator, mappings. */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { Table } from 'apache-arrow'
import type { ColumnMappingInput } from '@shared/schemas/localization-mapping.schema'

export function tempDir() {
  const dir = mkdtempSync(join(tmpdir(), 'ingest-test-'))
  return {
    dir,
    file(name: string, content: string | Uint8Array) {
      const path = join(dir, name)
      writeFileSync(path, content)
      return path
    },
    path: (name: string) => join(dir, name),
    remove: () => rmSync(dir, { recursive: true, force: true }),
  }
}

/** mulberry32: a small seeded generator, so failures reproduce. */
export function seeded(seed: number) {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

export type Random = () => number

/** One of `items`, chosen by `random`. */
export const pick = <T>(random: Random, items: readonly T[]): T =>
  items[Math.floor(random() * items.length)]!

/** frame, x, y (nm) and photons, in that column order. */
export const FXYP: ColumnMappingInput = {
  frameBase: 1,
  columns: [
    { index: 0, role: 'frame' },
    { index: 1, role: 'x', unit: 'nm' },
    { index: 2, role: 'y', unit: 'nm' },
    { index: 3, role: 'photons', unit: 'photons' },
  ],
}

const NUMERIC = [Float32Array, Float64Array, Uint32Array, Uint16Array, Uint8Array] as const

/** A numeric column of an Arrow table (or batch) as plain numbers. */
export function numbers(table: Pick<Table, 'getChild'>, name: string): number[] {
  const values: unknown = table.getChild(name)?.toArray()
  for (const type of NUMERIC) if (values instanceof type) return Array.from(values)
  throw new Error(`no numeric column ${name}`)
}

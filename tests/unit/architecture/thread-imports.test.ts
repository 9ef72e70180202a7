// @vitest-environment node
/**
 * Every thread loads what its entry imports, package by package, each time it starts (a job
 * thread per ingest): the ORM and its migrations alone cost a second of CPU there. The threads
 * do file work and report back; the main thread writes the database. The graph is read as the
 * thread's bundle is made (esbuild, server/threads/thread-bundle.mjs).
 */
import { fileURLToPath } from 'node:url'
import { build } from 'esbuild'
import { describe, expect, it } from 'vitest'

const root = fileURLToPath(new URL('../../../', import.meta.url))
const THREAD_ENTRIES = [
  'server/jobs/worker.ts',
  'server/compute/ingest/parse.worker.ts',
  'server/modules/preview/tile.worker.ts',
  'server/compute/quality/frc.thread.ts',
  'server/compute/regions/region.worker.ts',
]
const KEPT_OUT = /^(@mikro-orm\/|express|knex|better-sqlite3|pg$|pg-boss)/

/** The packages an entry's modules import (types aside), with the module importing each. */
async function packagesOf(entry: string) {
  const { metafile } = await build({
    entryPoints: [entry],
    absWorkingDir: root,
    bundle: true,
    packages: 'external',
    platform: 'node',
    format: 'esm',
    write: false,
    outdir: 'unused',
    metafile: true,
    logLevel: 'silent',
  })
  return Object.entries(metafile.inputs).flatMap(([file, input]) =>
    input.imports.filter((i) => i.external).map((i) => `${i.path} ← ${file}`),
  )
}

describe('thread entries', () => {
  it.each(THREAD_ENTRIES)('%s imports neither the ORM, the queue nor HTTP', async (entry) => {
    const packages = await packagesOf(entry)
    expect(packages.length).toBeGreaterThan(0)
    expect(packages.filter((p) => KEPT_OUT.test(p))).toEqual([])
  })
})

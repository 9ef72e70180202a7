/**
 * What starting one of our threads costs, loaded as it is in the server (the compiled bundle of
 * its TypeScript entry, server/threads/thread-bundle.mjs) against tsx registered in the thread
 * (how threads loaded before). Each start is a fresh process, so nothing is shared between
 * them but the bundle cache on disk (made once before timing). The entry is the ingest's parse
 * worker, which every cold ingest starts two of, and the job worker, the largest.
 */
import { execFile } from 'node:child_process'
import { writeFileSync, mkdtempSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'

const run = promisify(execFile)
const repo = fileURLToPath(new URL('../..', import.meta.url))
const ROUNDS = 7
const ENTRIES = {
  'parse worker': 'server/compute/ingest/parse.worker.ts',
  'job worker': 'server/jobs/worker.ts',
}

// One process starts one thread, which loads the entry one way and says so; the process then
// reports its CPU time and the wall time from the start of the thread.
const PROBE = `
import { Worker } from 'node:worker_threads'
const [entry, how, bundle] = process.argv.slice(2)
const cpu = process.cpuUsage()
const started = performance.now()
const thread = new Worker(new URL('./thread.mjs', import.meta.url), {
  workerData: { entry, how, bundle, dataDir: process.argv[5] },
})
thread.on('error', (e) => { console.error(e); process.exit(1) })
thread.on('message', async (m) => {
  if (m !== 'loaded') return
  const wallMs = performance.now() - started
  const used = process.cpuUsage(cpu)
  console.log('RESULT ' + JSON.stringify({ cpuMs: (used.user + used.system) / 1000, wallMs }))
  await thread.terminate()
})
`
const THREAD = `
import { parentPort, workerData } from 'node:worker_threads'
if (workerData.how === 'tsx') {
  ;(await import('tsx/esm/api')).register()
  await import(workerData.entry)
} else await import(workerData.bundle)
parentPort.postMessage('loaded')
`

const median = (values: number[]) => [...values].sort((a, b) => a - b)[values.length >> 1]!

export async function benchThreadStart(): Promise<Record<string, unknown>> {
  const { bundledEntry } = await import('../../server/threads/thread-bundle.mjs')
  const folder = mkdtempSync(join(repo, 'node_modules', '.cache', 'thread-start-'))
  const probe = join(folder, 'probe.mjs')
  writeFileSync(probe, PROBE)
  writeFileSync(join(folder, 'thread.mjs'), THREAD)
  const figures: Record<string, unknown> = {}
  try {
    for (const [label, path] of Object.entries(ENTRIES)) {
      const entry = new URL(path, `file://${repo}/`).href
      const bundle = await bundledEntry(entry)
      for (const how of ['tsx', 'bundle'] as const) {
        const cpu: number[] = []
        const wall: number[] = []
        for (let i = 0; i < ROUNDS; i++) {
          const { stdout } = await run(process.execPath, [probe, entry, how, bundle, folder], {
            cwd: repo,
          })
          const line = stdout.split('\n').find((l) => l.startsWith('RESULT '))!
          const r = JSON.parse(line.slice(7)) as { cpuMs: number; wallMs: number }
          cpu.push(r.cpuMs)
          wall.push(r.wallMs)
        }
        figures[`${label}, ${how}`] =
          `CPU ${Math.round(median(cpu))} ms, wall ${Math.round(median(wall))} ms (median of ${ROUNDS})`
      }
    }
  } finally {
    rmSync(folder, { recursive: true, force: true })
  }
  return figures
}

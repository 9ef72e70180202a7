import { execFile } from 'node:child_process'
import { promisify } from 'node:util'

const run = promisify(execFile)

/** What wrk-percentiles.lua prints on its `WRK {…}` line (latencies in µs). */
export interface WrkSummary {
  requests: number
  durationUs: number
  errors: number
  non2xx: number
  p50: number
  p95: number
  p99: number
  max: number
}

/** Runs wrk (Debian's `wrk`) with a script that ends in wrk-percentiles.lua's summary, and reads it. */
export async function runWrk(args: string[], env: NodeJS.ProcessEnv = process.env) {
  const { stdout } = await run('wrk', args, { env })
  const line = stdout.split('\n').find((l) => l.startsWith('WRK '))
  if (!line) throw new Error(`wrk printed no summary:\n${stdout}`)
  return JSON.parse(line.slice(4)) as WrkSummary
}

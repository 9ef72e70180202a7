/**
 * Two app nodes as separate processes (each the whole Stipple, its own temporary folder) on one
 * PostgreSQL database: jobs go through pg-boss from one to the other, and a node killed with
 * SIGKILL mid-job has its job run again on the other, once.
 */
import { fork, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type Orm } from '@server/db'
import type { JobNodeCommand, JobNodeReply } from '../fixtures/job-node'
import { jobRow, queueStates as statesOf } from '../fixtures/pg-boss-jobs'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'

let postgres: PostgresServer
let databaseUrl: string
/** The test's own look at the shared database. */
let orm: Orm
const nodes: JobNode[] = []

beforeAll(async () => {
  postgres = await startPostgres()
  databaseUrl = await postgres.createDatabase()
  orm = await openDatabase({ driver: 'postgresql', url: databaseUrl })
}, 60_000)
afterAll(async () => {
  await Promise.all(nodes.map((n) => n.kill()))
  await orm?.close()
  await postgres?.stop()
})

class JobNode {
  private refs = 0
  private constructor(
    private readonly child: ChildProcess,
    private readonly dataDir: string,
  ) {}

  static async start(): Promise<JobNode> {
    const dataDir = mkdtempSync(join(tmpdir(), 'stipple-job-node-'))
    const child = fork('tests/fixtures/job-node.ts', [], {
      execArgv: ['--import', 'tsx'],
      env: {
        ...process.env,
        NODE_ENV: 'test',
        DATABASE_URL: databaseUrl,
        DATA_DIR: dataDir,
        PORT: '0',
        HOST: '127.0.0.1',
        PUBLIC_URL: 'http://127.0.0.1',
        DEMO: 'false',
        LOG_LEVEL: 'silent',
        JOB_WORKERS: '1',
      },
      stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
    })
    await new Promise<void>((resolve, reject) => {
      child.once('message', (m: JobNodeReply) => (m.type === 'ready' ? resolve() : reject()))
      child.once('exit', (code) => reject(new Error(`node exited (${code}) before it was ready`)))
    })
    const node = new JobNode(child, dataDir)
    nodes.push(node)
    return node
  }

  private ask<T extends JobNodeReply>(
    command: JobNodeCommand extends infer C ? (C extends unknown ? Omit<C, 'ref'> : never) : never,
  ): Promise<T> {
    const ref = ++this.refs
    return new Promise((resolve) => {
      const listen = (m: JobNodeReply) => {
        if ('ref' in m && m.ref === ref) {
          this.child.off('message', listen)
          resolve(m as T)
        }
      }
      this.child.on('message', listen)
      this.child.send({ ...command, ref })
    })
  }

  async enqueueProbe(input: Record<string, unknown>): Promise<number> {
    return (await this.ask<Extract<JobNodeReply, { type: 'queued' }>>({ type: 'enqueue', input }))
      .id
  }

  async busy(): Promise<number> {
    return (await this.ask<Extract<JobNodeReply, { type: 'busy' }>>({ type: 'busy' })).busy
  }

  /** SIGTERM, and wait for the node's own shutdown. */
  async stop(): Promise<void> {
    await this.signal('SIGTERM')
  }

  /** SIGKILL: no shutdown code runs, as when a machine loses the process. */
  async kill(): Promise<void> {
    await this.signal('SIGKILL')
  }

  private async signal(signal: NodeJS.Signals): Promise<void> {
    if (this.child.exitCode === null && this.child.signalCode === null) {
      const exited = new Promise((resolve) => this.child.once('exit', resolve))
      this.child.kill(signal)
      await exited
    }
    rmSync(this.dataDir, { recursive: true, force: true })
  }
}

async function until(check: () => Promise<boolean>, ms = 60_000) {
  const end = Date.now() + ms
  while (!(await check())) {
    if (Date.now() > end) throw new Error('timed out')
    await new Promise((r) => setTimeout(r, 100))
  }
}

const rowOf = (id: number) => jobRow(orm, id)
const queueStates = (id: number) => statesOf(orm, id)

describe('two app nodes on one PostgreSQL database', () => {
  it('a job queued through node A runs on node B once A has stopped', async () => {
    const a = await JobNode.start()
    // A's one thread is busy, so the job waits in pg-boss, sent by A.
    const blocker = await a.enqueueProbe({ ms: 4000 })
    await until(async () => (await rowOf(blocker)).state === 'running')
    const job = await a.enqueueProbe({ ms: 100 })
    await until(async () => (await queueStates(job)).includes('created'))
    await a.stop()
    expect((await rowOf(job)).state).toBe('queued')
    await JobNode.start()
    await until(async () => (await rowOf(job)).state === 'done')
    expect(await rowOf(job)).toMatchObject({ attempts: 1 })
    // pg-boss completes its job just after our row turns done (see the pg-boss queue test).
    await expect.poll(() => queueStates(job), { timeout: 10_000 }).toEqual(['completed'])
    // The blocker, cut off on A, ran again on B to the end.
    await until(async () => (await rowOf(blocker)).state === 'done')
    expect(await rowOf(blocker)).toMatchObject({ attempts: 2 })
  }, 120_000)

  it('a node killed mid-job: the other node runs the job again, once', async () => {
    const [b] = nodes.slice(-1)
    const c = await JobNode.start()
    const job = await c.enqueueProbe({ ms: 5000 })
    await until(async () => (await rowOf(job)).state === 'running')
    await until(async () => (await b!.busy()) + (await c.busy()) === 1)
    const taker = (await b!.busy()) ? b! : c
    const other = taker === b ? c : b!
    await taker.kill()
    await until(async () => (await rowOf(job)).state === 'done')
    expect(await other.busy()).toBe(0)
    // A while longer: nothing runs it a third time.
    await new Promise((r) => setTimeout(r, 3000))
    expect(await rowOf(job)).toMatchObject({ state: 'done', attempts: 2 })
    expect(await queueStates(job)).toEqual(['completed'])
  }, 120_000)
})

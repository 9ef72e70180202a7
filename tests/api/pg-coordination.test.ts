/**
 * The cross-node coordination pieces on a real PostgreSQL server, each "node" with its own
 * connections as separate app nodes would have: upload locks, rate-limit counts, dataset events,
 * once-per-tick schedules and agreed secrets. The two-node tests (two-nodes.test.ts) check the
 * same through the whole server.
 */
import { ERRORS, type Lock } from '@tus/server'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '@server/db'
import { createLogger } from '@server/logger'
import { PgEventRelay } from '@server/coordination/pg-event-relay'
import { PgRateLimitStore } from '@server/coordination/pg-rate-limit-store'
import { PgSession } from '@server/coordination/pg-session'
import { runOncePerTick } from '@server/coordination/pg-tick-claim'
import { PgUploadLocker } from '@server/coordination/pg-upload-locker'
import { agreedSecret } from '@server/coordination/shared-secrets'
import type { DatasetEvent } from '@server/modules/events/dataset-events'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'

const logger = createLogger('silent')
let postgres: PostgresServer
let url: string
const closers: (() => Promise<unknown>)[] = []

/** What one app node opens: its pool and its coordination connection. */
function node() {
  const pool = new pg.Pool({ connectionString: url, max: 3 })
  const session = new PgSession(url, logger)
  closers.push(
    () => session.close(),
    () => pool.end(),
  )
  const notify = (channel: string, payload: string) =>
    pool.query('select pg_notify($1, $2)', [channel, payload])
  return { pool, session, notify }
}

async function lockerNode(timeoutMs = 5_000) {
  const n = node()
  const locker = new PgUploadLocker(n.session, n.notify, timeoutMs)
  await locker.start()
  return { ...n, locker }
}

async function waitFor<T>(what: string, probe: () => T | undefined, ms = 5_000): Promise<T> {
  const end = Date.now() + ms
  for (;;) {
    const value = probe()
    if (value !== undefined) return value
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 20))
  }
}

beforeAll(async () => {
  postgres = await startPostgres()
  url = await postgres.createDatabase()
  // The committed migrations make the coordination tables.
  const orm = await openDatabase({ driver: 'postgresql', url })
  await orm.close()
}, 60_000)

afterAll(async () => {
  for (const close of closers.reverse()) await close().catch(() => undefined)
  await postgres?.stop()
})

describe('upload locks on PostgreSQL advisory locks', () => {
  it('lets one node hold an upload while the other waits, and asks the holder to let go', async () => {
    const a = await lockerNode()
    const b = await lockerNode()
    const lockA = a.locker.newLock('upload-1')
    let releaseAsked = 0
    let lockAReleased = false
    await lockA.lock(new AbortController().signal, async () => {
      // As tus does: the holding request is cut short and its lock released.
      releaseAsked++
      if (lockAReleased) return
      lockAReleased = true
      await lockA.unlock()
    })
    const lockB = b.locker.newLock('upload-1')
    await lockB.lock(new AbortController().signal, () => undefined)
    expect(releaseAsked).toBeGreaterThanOrEqual(1)
    expect(lockAReleased).toBe(true)
    expect(b.locker.heldCount).toBe(1)
    expect(a.locker.heldCount).toBe(0)
    await lockB.unlock()
  })

  it('keeps two requests of one node apart too (advisory locks alone are re-entrant)', async () => {
    const a = await lockerNode(500)
    const first = a.locker.newLock('upload-2')
    await first.lock(new AbortController().signal, () => undefined)
    const second = a.locker.newLock('upload-2')
    await expect(second.lock(new AbortController().signal, () => undefined)).rejects.toBe(
      ERRORS.ERR_LOCK_TIMEOUT,
    )
    await first.unlock()
    await second.lock(new AbortController().signal, () => undefined)
    await second.unlock()
  })

  it('gives up after the timeout when the holder does not let go, and stops when the request is gone', async () => {
    const a = await lockerNode()
    const b = await lockerNode(400)
    const held = a.locker.newLock('upload-3')
    await held.lock(new AbortController().signal, () => undefined)
    await expect(
      b.locker.newLock('upload-3').lock(new AbortController().signal, () => undefined),
    ).rejects.toBe(ERRORS.ERR_LOCK_TIMEOUT)
    const gone = new AbortController()
    const waiting = b.locker.newLock('upload-3').lock(gone.signal, () => undefined)
    gone.abort()
    await expect(waiting).rejects.toBe(ERRORS.ERR_LOCK_TIMEOUT)
    await held.unlock()
  })

  it('frees the locks of a node whose connection ends, as when the node dies', async () => {
    const a = await lockerNode()
    const b = await lockerNode()
    await a.locker.newLock('upload-4').lock(new AbortController().signal, () => undefined)
    // Cut from the server side, as PostgreSQL does when a node's machine is gone.
    await b.pool.query(
      `select pg_terminate_backend(pid) from pg_stat_activity
        where application_name = 'stipple-coordination' and pid <> pg_backend_pid()
          and pid in (select pid from pg_locks where locktype = 'advisory')`,
    )
    const lockB: Lock = b.locker.newLock('upload-4')
    await lockB.lock(new AbortController().signal, () => undefined)
    await lockB.unlock()
  })
})

describe('rate-limit counts in PostgreSQL', () => {
  it('counts one key across nodes in one window, and resets it', async () => {
    const a = new PgRateLimitStore(node().pool, 'sign-in')
    const b = new PgRateLimitStore(node().pool, 'sign-in')
    const other = new PgRateLimitStore(node().pool, 'comments')
    for (const store of [a, b, other]) store.init({ windowMs: 60_000 } as never)
    const hits = await Promise.all(
      Array.from({ length: 10 }, (_, i) => (i % 2 ? a : b).increment('203.0.113.7')),
    )
    expect(hits.map((h) => h.totalHits).sort((x, y) => x - y)).toEqual([
      1, 2, 3, 4, 5, 6, 7, 8, 9, 10,
    ])
    expect((await other.increment('203.0.113.7')).totalHits).toBe(1)
    const info = await a.get('203.0.113.7')
    expect(info?.totalHits).toBe(10)
    expect(info!.resetTime!.getTime()).toBeGreaterThan(Date.now() + 50_000)
    await b.decrement('203.0.113.7')
    expect((await a.get('203.0.113.7'))?.totalHits).toBe(9)
    await a.resetKey('203.0.113.7')
    expect(await b.get('203.0.113.7')).toBeUndefined()
  })

  it('starts a new window once the old one ended', async () => {
    const store = new PgRateLimitStore(node().pool, 'short')
    store.init({ windowMs: 300 } as never)
    expect((await store.increment('k')).totalHits).toBe(1)
    expect((await store.increment('k')).totalHits).toBe(2)
    await new Promise((r) => setTimeout(r, 400))
    expect((await store.increment('k')).totalHits).toBe(1)
  })
})

describe('dataset events over LISTEN/NOTIFY', () => {
  it('reaches every node, the sender included, in order; a large event travels by id', async () => {
    const relays = [node(), node()].map((n) => new PgEventRelay(n.session, n.pool, logger))
    const heard: DatasetEvent[][] = [[], []]
    for (const [i, relay] of relays.entries()) {
      await relay.start()
      relay.onEvent((e) => heard[i]!.push(e))
    }
    const small: DatasetEvent = { datasetId: 7, name: 'comment.created', data: { id: 1 } }
    const large: DatasetEvent = {
      datasetId: 7,
      name: 'comment.updated',
      data: { id: 1, body: 'ü'.repeat(6000) }, // 12 000 bytes in UTF-8
    }
    const after: DatasetEvent = { datasetId: 7, name: 'region.deleted', data: { id: 2 } }
    await relays[0]!.publish(small)
    await relays[0]!.publish(large)
    await relays[0]!.publish(after)
    for (const list of heard) {
      await waitFor('three events', () => (list.length >= 3 ? true : undefined))
      expect(list).toEqual([small, large, after])
    }
  })
})

describe('schedules that tick once across nodes', () => {
  it('runs a tick on one node only, however many try it at once', async () => {
    const pools = [node().pool, node().pool, node().pool]
    let runs = 0
    const at = new Date('2030-01-01T10:00:07Z')
    const results = await Promise.all(
      pools.map((pool) =>
        runOncePerTick(pool, 'embargo-test', at, async () => {
          runs++
          await new Promise((r) => setTimeout(r, 100))
          return 'ran'
        }),
      ),
    )
    expect(runs).toBe(1)
    expect(results.filter((r) => r === 'ran')).toHaveLength(1)
    // Later in the same minute: already done. The next minute: runs again.
    expect(
      await runOncePerTick(
        pools[1]!,
        'embargo-test',
        new Date('2030-01-01T10:00:50Z'),
        async () => 'again',
      ),
    ).toBeNull()
    expect(
      await runOncePerTick(
        pools[2]!,
        'embargo-test',
        new Date('2030-01-01T10:01:00Z'),
        async () => 'next',
      ),
    ).toBe('next')
  })
})

describe('secrets the nodes agree on', () => {
  it('keeps the first offer and gives it to every node', async () => {
    const [a, b] = [node().pool, node().pool]
    const offers = await Promise.all([
      agreedSecret(a, 'test', 'from-a'),
      agreedSecret(b, 'test', 'from-b'),
    ])
    expect(new Set(offers).size).toBe(1)
    expect(await agreedSecret(b, 'test', 'later')).toBe(offers[0])
  })
})

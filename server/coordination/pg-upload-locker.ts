import { randomUUID } from 'node:crypto'
import { ERRORS, type Lock, type Locker, type RequestRelease } from '@tus/server'
import type pg from 'pg'
import type { PgSession } from './pg-session'

/** First key of every upload lock (advisory locks are two 32-bit keys: namespace, upload). */
export const UPLOAD_LOCK_NAMESPACE = 0x5354_0001
/** Waiting nodes ask the holder, wherever it runs, to let go of an upload. */
export const RELEASE_CHANNEL = 'stipple_upload_release'
const RETRY_MS = 100
/** A waiting request repeats its ask every this many tries, in case the holder missed it. */
const ASK_AGAIN_TRIES = 10

interface Holder {
  ticket: string
  requestRelease: RequestRelease
}

/**
 * tus's upload locks on PostgreSQL advisory locks, for app nodes on several machines. Each node
 * holds its locks on its one coordination connection (`PgSession`), so a node that dies (or
 * loses the database) frees them with its connection. Within a node, a lock is first taken in
 * memory (advisory locks are re-entrant per connection, so two requests of one node would both
 * get it). tus's semantics are kept: a request that waits asks the holder to let go (here by
 * NOTIFY, which reaches the holder on whichever node it runs) and gives up after the timeout.
 */
export class PgUploadLocker implements Locker {
  private readonly held = new Map<string, Holder>()

  constructor(
    private readonly session: PgSession,
    private readonly notify: (channel: string, payload: string) => Promise<unknown>,
    private readonly acquireTimeoutMs = 30_000,
  ) {}

  /** Listens for other nodes' requests to release; call once before serving. */
  async start(): Promise<void> {
    await this.session.listen(RELEASE_CHANNEL, (id) => void this.held.get(id)?.requestRelease())
    // The connection went, and its locks with it: whoever writes under them must stop.
    this.session.onLost(() => {
      for (const holder of this.held.values()) void holder.requestRelease()
    })
  }

  newLock(id: string): Lock {
    let ticket: string | null = null
    return {
      lock: async (signal, requestRelease) => {
        const mine = randomUUID()
        await this.acquire(id, mine, signal, requestRelease)
        ticket = mine
      },
      unlock: async () => {
        if (!ticket) throw new Error('Releasing an unlocked lock!')
        const mine = ticket
        ticket = null
        await this.release(id, mine)
      },
    }
  }

  /** Locks this node holds (tests and health pages). */
  get heldCount(): number {
    return this.held.size
  }

  private async acquire(
    id: string,
    ticket: string,
    signal: AbortSignal,
    requestRelease: RequestRelease,
  ): Promise<void> {
    let expired = false
    const timer = setTimeout(() => (expired = true), this.acquireTimeoutMs)
    try {
      await this.acquireUntil(id, ticket, signal, requestRelease, () => expired)
    } finally {
      clearTimeout(timer)
    }
  }

  private async acquireUntil(
    id: string,
    ticket: string,
    signal: AbortSignal,
    requestRelease: RequestRelease,
    expired: () => boolean,
  ): Promise<void> {
    for (let tries = 0; ; tries++) {
      if (signal.aborted) throw ERRORS.ERR_LOCK_TIMEOUT
      const local = this.held.get(id)
      if (local) {
        await local.requestRelease()
      } else {
        this.held.set(id, { ticket, requestRelease })
        const granted = await this.tryAdvisoryLock(id).catch((err: unknown) => {
          this.held.delete(id)
          throw err
        })
        if (granted) return
        this.held.delete(id)
        if (tries % ASK_AGAIN_TRIES === 0) await this.notify(RELEASE_CHANNEL, id)
      }
      if (expired()) throw ERRORS.ERR_LOCK_TIMEOUT
      await pause(RETRY_MS, signal)
    }
  }

  private async release(id: string, ticket: string): Promise<void> {
    if (this.held.get(id)?.ticket !== ticket) return
    // A lost connection took the lock with it: nothing to unlock then.
    await this.session
      .query('select pg_advisory_unlock($1, hashtext($2))', [UPLOAD_LOCK_NAMESPACE, id])
      .catch(() => undefined)
    this.held.delete(id)
  }

  private async tryAdvisoryLock(id: string): Promise<boolean> {
    const [row] = await this.session.query<{ locked: boolean } & pg.QueryResultRow>(
      'select pg_try_advisory_lock($1, hashtext($2)) as locked',
      [UPLOAD_LOCK_NAMESPACE, id],
    )
    return row?.locked === true
  }
}

function pause(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    const done = () => {
      clearTimeout(timer)
      signal.removeEventListener('abort', done)
      resolve()
    }
    const timer = setTimeout(done, ms)
    signal.addEventListener('abort', done, { once: true })
  })
}

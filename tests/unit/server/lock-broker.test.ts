// @vitest-environment node
/**
 * Upload locks across HTTP workers: the primary's LockBroker and each worker's IpcLocker, joined
 * here by in-memory channels that copy every message (as IPC does) and deliver it a turn later.
 * The reference is tus's own MemoryLocker: the same scenarios run against it, with both "workers"
 * sharing it as two requests in one process would, must tell the same story.
 */
import { ERRORS, MemoryLocker, type Locker } from '@tus/server'
import { describe, expect, it } from 'vitest'
import { IpcLocker } from '@server/cluster/ipc-locker'
import { LockBroker } from '@server/cluster/lock-broker'
import type { Channel, ToPrimary, ToWorker } from '@server/cluster/messages'

const TIMEOUT_MS = 300
const tick = () => new Promise((r) => setTimeout(r, 20))

/** A broker and two workers' lockers, wired together. */
function brokered() {
  const toWorker = new Map<number, (m: ToWorker) => void>()
  const broker = new LockBroker((owner, m) => {
    const copy = structuredClone(m)
    setImmediate(() => toWorker.get(owner)?.(copy))
  }, TIMEOUT_MS)
  const worker = (id: number) => {
    const channel: Channel<ToPrimary, ToWorker> = {
      send: (m) => {
        const copy = structuredClone(m)
        setImmediate(() => broker.handle(id, copy))
      },
      onMessage: (listener) => toWorker.set(id, listener),
    }
    return new IpcLocker(channel)
  }
  return { broker, a: worker(1), b: worker(2) }
}

function shared() {
  const locker = new MemoryLocker({ acquireLockTimeout: TIMEOUT_MS })
  return { a: locker, b: locker }
}

/** A holds the lock; B asks for it; A lets go when asked. */
async function handOver(a: Locker, b: Locker) {
  const log: string[] = []
  const held = a.newLock('upload-1')
  let releaseAsks = 0
  // Like tus's own handler (context.cancel), the holder acts on the first request only.
  await held.lock(new AbortController().signal, () => {
    if (releaseAsks++ > 0) return
    log.push('A asked to release')
    setTimeout(() => void held.unlock().then(() => log.push('A released')), 50)
  })
  log.push('A holds')
  await b
    .newLock('upload-1')
    .lock(new AbortController().signal, () => undefined)
    .then(() => log.push('B holds'))
  return { log, releaseAsks }
}

/** A holds the lock and never lets go; B gives up after the timeout. */
async function holderIgnores(a: Locker, b: Locker) {
  await a.newLock('upload-2').lock(new AbortController().signal, () => undefined)
  const started = Date.now()
  const error = await b
    .newLock('upload-2')
    .lock(new AbortController().signal, () => undefined)
    .then(
      () => null,
      (err: unknown) => err,
    )
  return { error, waitedMs: Date.now() - started }
}

/** B stops waiting (its request went away); A still holds, and a third request can still queue. */
async function waiterAborts(a: Locker, b: Locker) {
  const held = a.newLock('upload-3')
  await held.lock(new AbortController().signal, () => undefined)
  const abort = new AbortController()
  const waiting = b
    .newLock('upload-3')
    .lock(abort.signal, () => undefined)
    .then(
      () => 'granted',
      (err: unknown) => (err === ERRORS.ERR_LOCK_TIMEOUT ? 'gave up' : String(err)),
    )
  await tick()
  abort.abort()
  const outcome = await waiting
  await held.unlock()
  await b.newLock('upload-3').lock(new AbortController().signal, () => undefined)
  return outcome
}

describe.each([
  ['tus MemoryLocker (reference, one process)', shared],
  ['LockBroker + IpcLocker (two workers)', brokered],
])('%s', (_name, make) => {
  it('hands a lock over when the holder lets go on request', async () => {
    const { a, b } = make()
    const { log, releaseAsks } = await handOver(a, b)
    expect(log).toEqual(['A holds', 'A asked to release', 'A released', 'B holds'])
    // MemoryLocker asks on every turn while it waits; over IPC the holder hears it once.
    if (make === brokered) expect(releaseAsks).toBe(1)
  })

  it('gives up with tus’s lock timeout error when the holder never lets go', async () => {
    const { a, b } = make()
    const { error, waitedMs } = await holderIgnores(a, b)
    expect(error).toBe(ERRORS.ERR_LOCK_TIMEOUT)
    expect(waitedMs).toBeGreaterThanOrEqual(TIMEOUT_MS - 20)
  })

  it('stops waiting when the waiting request is aborted, without disturbing the holder', async () => {
    const { a, b } = make()
    expect(await waiterAborts(a, b)).toBe('gave up')
  })
})

describe('LockBroker', () => {
  it('frees what a dead worker held, and cancels what it waited for', async () => {
    const { broker, a, b } = brokered()
    await a.newLock('upload-4').lock(new AbortController().signal, () => undefined)
    await b.newLock('upload-5').lock(new AbortController().signal, () => undefined)
    // Worker 1 also waits for upload-5, which worker 2 keeps.
    const waited = a
      .newLock('upload-5')
      .lock(new AbortController().signal, () => undefined)
      .then(
        () => 'granted',
        () => 'cancelled',
      )
    await tick()
    broker.forgetWorker(1)
    expect(await waited).toBe('cancelled')
    expect(broker.heldCount).toBe(1) // worker 2's upload-5
    // upload-4 is free at once: worker 2 gets it without anybody being asked to let go.
    let asked = false
    await b.newLock('upload-4').lock(new AbortController().signal, () => void (asked = true))
    expect(asked).toBe(false)
    expect(broker.heldCount).toBe(2)
  })
})

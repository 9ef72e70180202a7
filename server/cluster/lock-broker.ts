import { MemoryLocker, type Lock } from '@tus/server'
import type { ToPrimary, ToWorker } from './messages'

interface Ticket {
  owner: number
  lock: Lock
  abort: AbortController
  held: boolean
  releaseAsked: boolean
}

/**
 * The primary's side of the upload locks. An upload's PATCH, HEAD or DELETE may reach any HTTP
 * worker, so the lock that keeps two requests from writing one upload at once has to live in one
 * place: here, in tus's own MemoryLocker, with tus's semantics intact (a waiting request asks the
 * holder to let go; an acquisition gives up after the timeout). Each lock a worker asks for is a
 * ticket; a worker that dies loses its tickets, so its uploads are free again at once.
 */
export class LockBroker {
  private readonly locker: MemoryLocker
  private readonly tickets = new Map<string, Ticket>()

  constructor(
    private readonly send: (owner: number, message: ToWorker) => void,
    acquireLockTimeout?: number,
  ) {
    this.locker = new MemoryLocker(acquireLockTimeout ? { acquireLockTimeout } : undefined)
  }

  /** Handles one message from worker `owner`; answers false when it was not about locks. */
  handle(owner: number, message: ToPrimary): boolean {
    switch (message.stipple) {
      case 'lock':
        this.acquire(owner, message.ticket, message.id)
        return true
      case 'lock-abort':
        this.tickets.get(message.ticket)?.abort.abort()
        return true
      case 'unlock':
        void this.release(message.ticket).then(() =>
          this.send(owner, { stipple: 'unlocked', ticket: message.ticket }),
        )
        return true
      default:
        return false
    }
  }

  /** A worker is gone: what it waited for is cancelled and what it held is free. */
  forgetWorker(owner: number): void {
    for (const [ticket, t] of this.tickets) {
      if (t.owner !== owner) continue
      if (t.held) void this.release(ticket)
      else t.abort.abort()
    }
  }

  get heldCount(): number {
    return [...this.tickets.values()].filter((t) => t.held).length
  }

  private acquire(owner: number, ticket: string, id: string) {
    const t: Ticket = {
      owner,
      lock: this.locker.newLock(id),
      abort: new AbortController(),
      held: false,
      releaseAsked: false,
    }
    this.tickets.set(ticket, t)
    // MemoryLocker asks the holder again on every turn while it waits; the worker needs it once.
    const requestRelease = () => {
      if (t.releaseAsked) return
      t.releaseAsked = true
      this.send(owner, { stipple: 'release-requested', ticket })
    }
    t.lock.lock(t.abort.signal, requestRelease).then(
      () => {
        t.held = true
        this.send(owner, { stipple: 'locked', ticket })
      },
      () => {
        this.tickets.delete(ticket)
        this.send(owner, { stipple: 'lock-failed', ticket })
      },
    )
  }

  private async release(ticket: string) {
    const t = this.tickets.get(ticket)
    if (!t?.held) return
    this.tickets.delete(ticket)
    await t.lock.unlock()
  }
}

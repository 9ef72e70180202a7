import { randomUUID } from 'node:crypto'
import { ERRORS, type Lock, type Locker, type RequestRelease } from '@tus/server'
import type { Channel, ToPrimary, ToWorker } from './messages'

interface Waiting {
  granted: () => void
  failed: (err: unknown) => void
  requestRelease: RequestRelease
}

/**
 * A worker's tus locker: every lock is asked of the primary's LockBroker, so an upload is locked
 * across all HTTP workers, not only in the process that happens to serve the request.
 */
export class IpcLocker implements Locker {
  private readonly waiting = new Map<string, Waiting>()
  private readonly holding = new Map<string, RequestRelease>()
  private readonly unlocking = new Map<string, () => void>()

  constructor(private readonly channel: Channel<ToPrimary, ToWorker>) {
    channel.onMessage((message) => this.onMessage(message))
  }

  newLock(id: string): Lock {
    let ticket: string | null = null
    return {
      lock: (signal, requestRelease) => {
        const mine = randomUUID()
        ticket = mine
        return this.lock(mine, id, signal, requestRelease)
      },
      unlock: () => {
        if (!ticket) throw new Error('Releasing an unlocked lock!')
        const mine = ticket
        ticket = null
        return this.unlock(mine)
      },
    }
  }

  private lock(ticket: string, id: string, signal: AbortSignal, requestRelease: RequestRelease) {
    return new Promise<void>((resolve, reject) => {
      const onAbort = () => this.channel.send({ stipple: 'lock-abort', ticket })
      signal.addEventListener('abort', onAbort, { once: true })
      const settle = () => signal.removeEventListener('abort', onAbort)
      this.waiting.set(ticket, {
        requestRelease,
        granted: () => (settle(), resolve()),
        failed: (err) => (settle(), reject(err)),
      })
      this.channel.send({ stipple: 'lock', ticket, id })
    })
  }

  private unlock(ticket: string) {
    this.holding.delete(ticket)
    return new Promise<void>((resolve) => {
      this.unlocking.set(ticket, resolve)
      this.channel.send({ stipple: 'unlock', ticket })
    })
  }

  private onMessage(message: ToWorker) {
    switch (message.stipple) {
      case 'locked': {
        const w = this.waiting.get(message.ticket)
        if (!w) return
        this.waiting.delete(message.ticket)
        this.holding.set(message.ticket, w.requestRelease)
        w.granted()
        return
      }
      case 'lock-failed': {
        const w = this.waiting.get(message.ticket)
        this.waiting.delete(message.ticket)
        w?.failed(ERRORS.ERR_LOCK_TIMEOUT)
        return
      }
      case 'release-requested':
        void this.holding.get(message.ticket)?.()
        return
      case 'unlocked':
        this.unlocking.get(message.ticket)?.()
        this.unlocking.delete(message.ticket)
        return
    }
  }
}

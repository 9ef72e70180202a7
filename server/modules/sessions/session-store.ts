import { Store, type SessionData } from 'express-session'
import type { Orm } from '../../db'
import { Session } from './session.entity'

const DAY_MS = 86_400_000

/** express-session store on the ORM: sessions survive restarts and live in the same SQLite file. */
export class OrmSessionStore extends Store {
  constructor(private readonly orm: Orm) {
    super()
  }

  private expiry(data: SessionData): Date {
    const expires = data.cookie?.expires
    return expires ? new Date(expires) : new Date(Date.now() + DAY_MS)
  }

  override get(sid: string, cb: (err: unknown, session?: SessionData | null) => void): void {
    this.orm.em
      .fork()
      .findOne(Session, { sid, expiresAt: { $gt: new Date() } })
      .then((row) => cb(null, row ? (row.data as unknown as SessionData) : null), cb)
  }

  override set(sid: string, data: SessionData, cb?: (err?: unknown) => void): void {
    const em = this.orm.em.fork()
    em.upsert(Session, {
      sid,
      data: JSON.parse(JSON.stringify(data)),
      expiresAt: this.expiry(data),
    }).then(
      () => cb?.(),
      (err) => cb?.(err),
    )
  }

  override destroy(sid: string, cb?: (err?: unknown) => void): void {
    this.orm.em
      .fork()
      .nativeDelete(Session, { sid })
      .then(
        () => cb?.(),
        (err) => cb?.(err),
      )
  }

  override touch(sid: string, data: SessionData, cb?: () => void): void {
    this.orm.em
      .fork()
      .nativeUpdate(Session, { sid }, { expiresAt: this.expiry(data) })
      .then(
        () => cb?.(),
        () => cb?.(),
      )
  }

  /** Deletes expired sessions; the scheduler calls it. */
  async prune(now = new Date()): Promise<number> {
    return this.orm.em.fork().nativeDelete(Session, { expiresAt: { $lte: now } })
  }
}

import pg from 'pg'
import type { Logger } from '../logger'

type Listener = (payload: string) => void

const RECONNECT_MAX_MS = 30_000

/**
 * One long-lived PostgreSQL connection per node, for what belongs to a session rather than to a
 * statement: LISTEN (notifications arrive only on the connection that listens) and advisory locks
 * (held until released or until the connection ends, so a node that dies frees its locks).
 * When the connection drops it is opened again with back-off and the channels listened to again;
 * `onLost` tells the lock holders that their locks went with it.
 */
export class PgSession {
  private client: pg.Client | null = null
  private readonly channels = new Map<string, Set<Listener>>()
  private readonly lostListeners = new Set<() => void>()
  private connecting: Promise<pg.Client> | null = null
  private closed = false

  constructor(
    private readonly url: string,
    private readonly logger: Logger,
  ) {}

  /** Opens the connection (the first call waits for it; later ones reuse it). */
  connection(): Promise<pg.Client> {
    if (this.client) return Promise.resolve(this.client)
    this.connecting ??= this.open().finally(() => (this.connecting = null))
    return this.connecting
  }

  async query<R extends pg.QueryResultRow>(sql: string, values: unknown[] = []): Promise<R[]> {
    const client = await this.connection()
    return (await client.query<R>(sql, values)).rows
  }

  /** Listens to a channel; the listener gets each notification's payload. */
  async listen(channel: string, listener: Listener): Promise<void> {
    let set = this.channels.get(channel)
    const first = !set
    if (!set) this.channels.set(channel, (set = new Set()))
    set.add(listener)
    // LISTEN twice is harmless: a connection opened meanwhile may have listened already.
    const client = await this.connection()
    if (first) await client.query(`listen ${pg.escapeIdentifier(channel)}`)
  }

  /** Called when the connection was lost: every advisory lock it held is gone. */
  onLost(listener: () => void): void {
    this.lostListeners.add(listener)
  }

  async close(): Promise<void> {
    this.closed = true
    const client = this.client
    this.client = null
    await client?.end().catch(() => undefined)
  }

  private async open(): Promise<pg.Client> {
    for (let delay = 500; ; delay = Math.min(delay * 2, RECONNECT_MAX_MS)) {
      if (this.closed) throw new Error('The coordination connection is closed.')
      const client = new pg.Client({
        connectionString: this.url,
        application_name: 'stipple-coordination',
      })
      try {
        await client.connect()
        client.on('notification', (n) => {
          for (const listener of this.channels.get(n.channel) ?? []) listener(n.payload ?? '')
        })
        client.on('error', (err) => this.dropped(client, err))
        client.on('end', () => this.dropped(client, null))
        for (const channel of this.channels.keys())
          await client.query(`listen ${pg.escapeIdentifier(channel)}`)
        this.client = client
        return client
      } catch (err) {
        await client.end().catch(() => undefined)
        this.logger.error(
          { err, retryInMs: delay },
          'cannot reach PostgreSQL for coordination; trying again',
        )
        await new Promise((resolve) => setTimeout(resolve, delay))
      }
    }
  }

  private dropped(client: pg.Client, err: Error | null) {
    if (this.client !== client) return
    this.client = null
    if (this.closed) return
    this.logger.error({ err }, 'the coordination connection to PostgreSQL was lost')
    for (const listener of this.lostListeners) listener()
    // Notifications sent meanwhile are missed; listening resumes as soon as it is back.
    void this.connection().catch(() => undefined)
  }
}

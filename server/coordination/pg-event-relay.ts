import type pg from 'pg'
import type { Logger } from '../logger'
import type { DatasetEvent, DatasetEventRelay } from '../modules/events/dataset-events'
import type { PgSession } from './pg-session'

export const EVENT_CHANNEL = 'stipple_dataset_events'
export const EVENT_PAYLOAD_TABLE = 'coordination_event_payload'
/** PostgreSQL refuses a NOTIFY payload of 8000 bytes or more; larger events travel by id. */
export const NOTIFY_PAYLOAD_LIMIT = 7999

/** What travels in a notification: the event itself, or the id of its stored copy. */
type Wire = { event: DatasetEvent } | { ref: string }

/**
 * Dataset events (comments, regions) for every app node's open event streams, over PostgreSQL's
 * LISTEN/NOTIFY. Each node listens on its coordination connection and hears its own events the
 * same way as the others', so a stream sees one order whichever node it is open on. An event too
 * large for a notification is written to an unlogged table and its id sent instead; listeners
 * read it back (rows older than a few minutes are dropped as new ones arrive).
 */
export class PgEventRelay implements DatasetEventRelay {
  private readonly listeners = new Set<(event: DatasetEvent) => void>()
  /** Events are delivered in the order they arrived, even when one has to be read back. */
  private delivered: Promise<void> = Promise.resolve()

  constructor(
    private readonly session: PgSession,
    private readonly pool: pg.Pool,
    private readonly logger: Logger,
  ) {}

  async start(): Promise<void> {
    await this.session.listen(EVENT_CHANNEL, (payload) => {
      this.delivered = this.delivered.then(() => this.receive(payload))
    })
  }

  send(event: DatasetEvent): void {
    void this.publish(event).catch((err: unknown) =>
      this.logger.error({ err, datasetId: event.datasetId }, 'could not send a dataset event'),
    )
  }

  onEvent(listener: (event: DatasetEvent) => void): void {
    this.listeners.add(listener)
  }

  async publish(event: DatasetEvent): Promise<void> {
    let payload = JSON.stringify({ event } satisfies Wire)
    if (Buffer.byteLength(payload) > NOTIFY_PAYLOAD_LIMIT) {
      const { rows } = await this.pool.query<{ id: string }>(
        `with old as (
           delete from ${EVENT_PAYLOAD_TABLE} where created_at < now() - interval '5 minutes'
         )
         insert into ${EVENT_PAYLOAD_TABLE} (body) values ($1) returning id::text as id`,
        [JSON.stringify(event)],
      )
      payload = JSON.stringify({ ref: rows[0]!.id } satisfies Wire)
    }
    await this.pool.query('select pg_notify($1, $2)', [EVENT_CHANNEL, payload])
  }

  private async receive(payload: string): Promise<void> {
    try {
      const wire = JSON.parse(payload) as Wire
      const event = 'event' in wire ? wire.event : await this.stored(wire.ref)
      if (!event) return
      for (const listener of this.listeners) listener(event)
    } catch (err) {
      this.logger.error({ err }, 'could not read a dataset event')
    }
  }

  private async stored(id: string): Promise<DatasetEvent | null> {
    const { rows } = await this.pool.query<{ body: string }>(
      `select body from ${EVENT_PAYLOAD_TABLE} where id = $1`,
      [id],
    )
    return rows[0] ? (JSON.parse(rows[0].body) as DatasetEvent) : null
  }
}

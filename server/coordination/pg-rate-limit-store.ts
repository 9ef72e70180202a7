import type { ClientRateLimitInfo, IncrementResponse, Options, Store } from 'express-rate-limit'
import type pg from 'pg'

export const RATE_LIMIT_TABLE = 'coordination_rate_limit'

interface CountRow extends pg.QueryResultRow {
  hits: number
  reset_ms: number
}

const asInfo = (row: CountRow): ClientRateLimitInfo => ({
  totalHits: Number(row.hits),
  resetTime: new Date(Number(row.reset_ms)),
})

/**
 * express-rate-limit's counts in PostgreSQL, so a limit holds for every app node together (a
 * fixed window per key, as the package's own memory store counts). Windows follow the database's
 * clock, the one clock all nodes share. The table is unlogged: counts are worth nothing after a
 * crash of the database, and skipping the write-ahead log keeps each count one cheap upsert.
 */
export class PgRateLimitStore implements Store {
  readonly localKeys = false
  private windowMs = 60_000

  constructor(
    private readonly pool: pg.Pool,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await this.pool.query<CountRow>(
      `select hits, extract(epoch from reset_at)::float8 * 1000 as reset_ms
         from ${RATE_LIMIT_TABLE} where key = $1 and reset_at > now()`,
      [this.key(key)],
    )
    return rows[0] ? asInfo(rows[0]) : undefined
  }

  async increment(key: string): Promise<IncrementResponse> {
    // One statement, so two nodes counting the same key at once both count.
    const { rows } = await this.pool.query<CountRow>(
      `insert into ${RATE_LIMIT_TABLE} as c (key, hits, reset_at)
         values ($1, 1, now() + $2 * interval '1 millisecond')
       on conflict (key) do update set
         hits = case when c.reset_at <= now() then 1 else c.hits + 1 end,
         reset_at = case when c.reset_at <= now() then excluded.reset_at else c.reset_at end
       returning hits, extract(epoch from reset_at)::float8 * 1000 as reset_ms`,
      [this.key(key), this.windowMs],
    )
    return asInfo(rows[0]!)
  }

  async decrement(key: string): Promise<void> {
    await this.pool.query(
      `update ${RATE_LIMIT_TABLE} set hits = greatest(hits - 1, 0)
        where key = $1 and reset_at > now()`,
      [this.key(key)],
    )
  }

  async resetKey(key: string): Promise<void> {
    await this.pool.query(`delete from ${RATE_LIMIT_TABLE} where key = $1`, [this.key(key)])
  }

  async resetAll(): Promise<void> {
    await this.pool.query(`delete from ${RATE_LIMIT_TABLE} where key like $1`, [
      `${this.prefix.replace(/[\\%_]/g, '\\$&')}:%`,
    ])
  }

  private key(key: string) {
    return `${this.prefix}:${key}`
  }
}

/** Drops windows that ended (the hourly upkeep calls it). */
export async function pruneRateLimits(pool: pg.Pool): Promise<number> {
  const { rowCount } = await pool.query(`delete from ${RATE_LIMIT_TABLE} where reset_at <= now()`)
  return rowCount ?? 0
}

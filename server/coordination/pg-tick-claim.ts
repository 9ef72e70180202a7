import type pg from 'pg'

export const TICK_TABLE = 'coordination_tick'
/** First key of the advisory lock held while a claimed tick runs. */
export const TICK_LOCK_NAMESPACE = 0x5354_0002

/**
 * Runs `work` for one tick of a schedule (`name`, at the minute of `at`) on exactly one of the
 * app nodes. The tick is claimed with a row (the first node to move `last_at` forward wins;
 * every other node finds it moved and skips), and the winner holds an advisory lock while it
 * works, so a slow tick is never overlapped by the next one elsewhere. A node that dies mid-tick
 * frees the lock with its connection; what it left undone waits for the next tick (the work
 * itself must be safe to repeat). Answers null when another node has, or is running, the tick.
 */
export async function runOncePerTick<T>(
  pool: pg.Pool,
  name: string,
  at: Date,
  work: () => Promise<T>,
): Promise<T | null> {
  const minute = new Date(Math.floor(at.getTime() / 60_000) * 60_000)
  const client = await pool.connect()
  let locked = false
  try {
    const claimed = await client.query(
      `insert into ${TICK_TABLE} as t (name, last_at) values ($1, $2)
       on conflict (name) do update set last_at = excluded.last_at
         where t.last_at < excluded.last_at
       returning name`,
      [name, minute],
    )
    if (!claimed.rowCount) return null
    const { rows } = await client.query<{ locked: boolean }>(
      'select pg_try_advisory_lock($1, hashtext($2)) as locked',
      [TICK_LOCK_NAMESPACE, name],
    )
    locked = rows[0]?.locked === true
    if (!locked) return null
    return await work()
  } finally {
    if (locked)
      await client
        .query('select pg_advisory_unlock($1, hashtext($2))', [TICK_LOCK_NAMESPACE, name])
        .catch(() => undefined)
    client.release()
  }
}

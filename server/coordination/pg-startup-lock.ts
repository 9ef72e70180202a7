import pg from 'pg'

/** First key of the advisory lock app nodes take while they bring the schema up to date. */
export const MIGRATION_LOCK = [0x5354_0003, 1] as const

/**
 * Runs `work` while holding a session advisory lock on its own connection, so app nodes started
 * at the same moment (a compose file's replicas, a rolling restart) migrate one after the other:
 * the second finds the schema up to date. The lock goes with the connection if the node dies.
 */
export async function whileHoldingStartupLock<T>(url: string, work: () => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url, application_name: 'stipple-startup' })
  await client.connect()
  try {
    await client.query('select pg_advisory_lock($1, $2)', [...MIGRATION_LOCK])
    return await work()
  } finally {
    await client.end().catch(() => undefined)
  }
}

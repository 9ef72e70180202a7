import type { EntityManager } from '@mikro-orm/better-sqlite'

/**
 * Takes the next number of a named sequence atomically (one SQL statement), inside the caller's
 * transaction. Deleting what carried a number never gives the number back.
 */
export async function nextSequenceValue(em: EntityManager, name: string): Promise<number> {
  const rows = await em.getConnection().execute<{ value: number }[]>(
    // Standard double quotes: the same statement runs on SQLite and PostgreSQL.
    'insert into "sequence" ("name", "value") values (?, 1) on conflict ("name") do update set "value" = "sequence"."value" + 1 returning "value"',
    [name],
    'all',
    em.getTransactionContext(),
  )
  const value = rows[0]?.value
  if (typeof value !== 'number') throw new Error(`sequence ${name} returned nothing`)
  return value
}

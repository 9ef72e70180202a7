import type pg from 'pg'

export const SECRET_TABLE = 'coordination_secret'

/**
 * The value every node agrees on for a secret: this node offers its own (made on its first start,
 * in its data folder), the first offer kept in the database wins, and every node uses that one.
 * Without it, a session cookie signed on one node, or a sign-in the stand-in provider began on
 * one node, would be unreadable on the next.
 */
export async function agreedSecret(pool: pg.Pool, name: string, offered: string): Promise<string> {
  await pool.query(
    `insert into ${SECRET_TABLE} (name, value) values ($1, $2) on conflict (name) do nothing`,
    [name, offered],
  )
  // A statement of its own: the insert's snapshot would not see another node's offer that won
  // the race (its insert waited for that commit, then did nothing).
  const { rows } = await pool.query<{ value: string }>(
    `select value from ${SECRET_TABLE} where name = $1`,
    [name],
  )
  return rows[0]?.value ?? offered
}

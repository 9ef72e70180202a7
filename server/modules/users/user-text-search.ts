import type { EntityManager } from '@mikro-orm/better-sqlite'

/** LIKE's wildcards and its escape character, matched as themselves. */
const literally = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`)

// Portable SQL: "user" is a reserved word on PostgreSQL, and instr() exists on SQLite only, so
// the text is a LIKE pattern with its wildcards escaped (SQLite has no default escape character).
const SQL = `select "id" from "user" where lower("name") like ? escape '\\' or lower("email") like ? escape '\\'`

/**
 * Ids of the users whose name or e-mail contains the typed text, taken literally (% and _ are
 * characters, not wildcards), ignoring case; at most `limit` of them when given.
 */
export async function userIdsContaining(
  em: EntityManager,
  text: string,
  limit?: number,
): Promise<number[]> {
  const pattern = `%${literally(text.toLowerCase())}%`
  const rows = await em
    .getConnection()
    .execute<{ id: number }[]>(limit ? `${SQL} limit ${Math.floor(limit)}` : SQL, [
      pattern,
      pattern,
    ])
  return rows.map((r) => r.id)
}

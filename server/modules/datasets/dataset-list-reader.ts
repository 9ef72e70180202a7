import type { EntityManager } from '@mikro-orm/better-sqlite'
import Database from 'better-sqlite3'

/** Runs the list's read-only statements and gives each row as an array of its columns. */
export interface ListReader {
  rows(sql: string, params: unknown[]): unknown[][] | Promise<unknown[][]>
  /** The first column of every row (for long lists of ids: no array per row). */
  column(sql: string, params: unknown[]): number[] | Promise<number[]>
}

/** Prepared statements kept per SQL text; visibility is part of the text, so bound the count. */
const MAX_STATEMENTS = 500

/**
 * On a database file the list reads through its own read-only connection with prepared
 * statements, without a promise or the ORM's query layer per query (they cost more than the
 * statements). It sees only committed changes, so nothing it reads is older than the access
 * version the request began with. It opens on the first list request and lives as long as the
 * process, like the app. An in-memory database (tests) has no second connection: there the same
 * SQL goes through the ORM.
 */
export function listReader(dbPath: string, em: () => EntityManager): ListReader {
  if (dbPath === ':memory:') {
    return {
      async rows(sql, params) {
        const rows = await em().getConnection().execute<Record<string, unknown>[]>(sql, params)
        return rows.map((row) => Object.values(row))
      },
      async column(sql, params) {
        const rows = await em().getConnection().execute<Record<string, number>[]>(sql, params)
        return rows.map((row) => Object.values(row)[0]!)
      },
    }
  }
  let db: Database.Database | undefined
  const statements = new Map<string, Database.Statement<unknown[], unknown[]>>()
  const prepared = (sql: string, pluck: boolean) => {
    db ??= new Database(dbPath, { readonly: true, fileMustExist: true })
    const key = pluck ? `pluck:${sql}` : sql
    let statement = statements.get(key)
    if (statement) {
      statements.delete(key) // re-inserted below: the map's order is the least recently used first
    } else {
      const fresh = db.prepare<unknown[], unknown[]>(sql)
      statement = pluck ? fresh.pluck(true) : fresh.raw(true)
      if (statements.size >= MAX_STATEMENTS) statements.delete(statements.keys().next().value!)
    }
    statements.set(key, statement)
    return statement
  }
  return {
    rows: (sql, params) => prepared(sql, false).all(...params),
    column: (sql, params) => prepared(sql, true).all(...params) as unknown as number[],
  }
}

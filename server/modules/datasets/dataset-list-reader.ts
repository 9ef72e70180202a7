import type { EntityManager } from '@mikro-orm/better-sqlite'
import Database from 'better-sqlite3'

/** Runs the list's read-only statements and gives each row as an array of its columns. */
export interface ListReader {
  rows(sql: string, params: unknown[]): unknown[][] | Promise<unknown[][]>
  close(): void
}

/** Prepared statements kept per SQL text; visibility is part of the text, so bound the count. */
const MAX_STATEMENTS = 500

/**
 * On a database file the list reads through its own read-only connection with prepared
 * statements, without a promise or the ORM's query layer per query (they cost more than the
 * statements). It sees only committed changes, so nothing it reads is older than the access
 * version the request began with. An in-memory database (tests) has no second connection: there
 * the same SQL goes through the ORM.
 */
export function listReader(dbPath: string, em: () => EntityManager): ListReader {
  if (dbPath === ':memory:') {
    return {
      async rows(sql, params) {
        const rows = await em().getConnection().execute<Record<string, unknown>[]>(sql, params)
        return rows.map((row) => Object.values(row))
      },
      close() {},
    }
  }
  let db: Database.Database | null = null
  const statements = new Map<string, Database.Statement<unknown[], unknown[]>>()
  const prepared = (sql: string) => {
    db ??= new Database(dbPath, { readonly: true, fileMustExist: true })
    let statement = statements.get(sql)
    if (statement) {
      statements.delete(sql) // re-inserted below: the map's order is the least recently used first
    } else {
      statement = db.prepare<unknown[], unknown[]>(sql).raw(true)
      if (statements.size >= MAX_STATEMENTS) statements.delete(statements.keys().next().value!)
    }
    statements.set(sql, statement)
    return statement
  }
  return {
    rows: (sql, params) => prepared(sql).all(...params),
    close() {
      statements.clear()
      db?.close()
      db = null
    },
  }
}

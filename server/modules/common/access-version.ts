import type { EntityManager } from '@mikro-orm/better-sqlite'
import Database from 'better-sqlite3'

// Standard double quotes: the same text runs on SQLite and PostgreSQL.
const SQL = `select "value" from "sequence" where "name" = 'access-version'`

/** Reads the counter the database raises on every access-relevant change (see its migration). */
export async function readAccessVersion(em: EntityManager): Promise<number> {
  const row = await em
    .getConnection()
    .execute<{ value?: number }>(SQL, [], 'get', em.getTransactionContext())
  return row?.value ?? 0
}

/**
 * The same read for the hot path, done once per request. On a database file it uses its own
 * read-only connection with the statement prepared once (microseconds, and it sees only committed
 * changes, never another request's open transaction). An in-memory database has no second
 * connection, so there it goes through the ORM, as on PostgreSQL (no file: `dbPath` null).
 */
export class AccessVersionReader {
  private readonly statement: Database.Statement<[], { value: number }> | null

  constructor(
    dbPath: string | null,
    private readonly em: () => EntityManager,
  ) {
    this.statement =
      dbPath === null || dbPath === ':memory:'
        ? null
        : new Database(dbPath, { readonly: true, fileMustExist: true }).prepare(SQL)
  }

  /** The version without a promise, when this reader has its own connection; otherwise null. */
  readNow(): number | null {
    return this.statement ? (this.statement.get()?.value ?? 0) : null
  }

  async read(): Promise<number> {
    if (!this.statement) return readAccessVersion(this.em())
    return this.statement.get()?.value ?? 0
  }

  close(): void {
    this.statement?.database.close()
  }
}

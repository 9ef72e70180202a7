import Database from 'better-sqlite3'
import type { Orm } from '../../db'

type Row = Record<string, unknown>

/**
 * A better-sqlite3 handle for the hottest read-only lookups, with each statement prepared once:
 * a lookup then costs tens of microseconds instead of the ORM's query building, hydration and
 * identity map (≈0.7 ms a query on this kind of machine, measured on the tile route). On a
 * database file it is a connection of its own, read-only, that sees only committed rows, never
 * another request's open transaction. An in-memory database (tests) has no second connection, so
 * there it borrows the ORM's. Results are plain rows; nothing here writes.
 */
export class ReadConnection {
  private database: Promise<Database.Database> | null = null
  private readonly statements = new Map<string, Database.Statement<unknown[], Row>>()

  constructor(private readonly orm: Orm) {}

  private open(): Promise<Database.Database> {
    const dbName = this.orm.config.get('dbName') ?? ':memory:'
    if (dbName !== ':memory:')
      return Promise.resolve(new Database(dbName, { readonly: true, fileMustExist: true }))
    const knex = this.orm.em.getConnection().getKnex()
    return (async () => {
      const connection = (await knex.client.acquireConnection()) as Database.Database
      await knex.client.releaseConnection(connection)
      return connection
    })()
  }

  /** The first row of `sql` with these parameters, or undefined. */
  async get<T extends object>(sql: string, ...params: unknown[]): Promise<T | undefined> {
    this.database ??= this.open()
    const database = await this.database
    let statement = this.statements.get(sql)
    if (!statement) {
      statement = database.prepare<unknown[], Row>(sql)
      this.statements.set(sql, statement)
    }
    return statement.get(...params) as T | undefined
  }

  close(): void {
    const dbName = this.orm.config.get('dbName') ?? ':memory:'
    if (this.database && dbName !== ':memory:') void this.database.then((d) => d.close())
  }
}

import Database from 'better-sqlite3'
import { databaseDriver, type Orm } from '../../db'

type Shape = 'object' | 'raw' | 'pluck'
type Statement = Database.Statement<unknown[], unknown>

/** Prepared statements kept per SQL text and shape; list SQL carries visibility, so bound them. */
const MAX_STATEMENTS = 500

/**
 * A better-sqlite3 handle for the hottest read-only lookups (tiles, the dataset list), each
 * statement prepared once: a read then costs tens of microseconds instead of the ORM's query
 * building, hydration and identity map (≈0.7 ms a query on this kind of machine, measured on the
 * tile route). On a database file it is a connection of its own, read-only, that sees only
 * committed rows, never another request's open transaction, so nothing read is older than the
 * access version the request began with. An in-memory database (tests) has no second connection,
 * so there it borrows the ORM's. It opens on first use and lives as long as the app.
 *
 * On PostgreSQL there is no file to open: the same SQL (standard quoting only) goes through the
 * ORM's pool, and the row shapes are built from its rows.
 */
export class ReadConnection {
  private database: Database.Database | null = null
  private opening: Promise<Database.Database> | null = null
  private readonly statements = new Map<string, Statement>()

  private readonly pooled: boolean

  constructor(private readonly orm: Orm) {
    this.pooled = databaseDriver(orm) === 'postgresql'
  }

  /** The SQL dialect of the database behind it. */
  get dialect(): 'sqlite' | 'postgresql' {
    return this.pooled ? 'postgresql' : 'sqlite'
  }

  /** Rows as objects in the order of the select list, through the ORM's pool. */
  private pooledRows(sql: string, params: unknown[]): Promise<Record<string, unknown>[]> {
    return this.orm.em.getConnection().execute<Record<string, unknown>[]>(sql, params, 'all')
  }

  private get dbName(): string {
    return this.orm.config.get('dbName') ?? ':memory:'
  }

  private open(): Promise<Database.Database> {
    this.opening ??= (async () => {
      if (this.dbName !== ':memory:')
        return new Database(this.dbName, { readonly: true, fileMustExist: true })
      const knex = this.orm.em.getConnection().getKnex()
      const connection = (await knex.client.acquireConnection()) as Database.Database
      await knex.client.releaseConnection(connection)
      return connection
    })().then((database) => (this.database = database))
    return this.opening
  }

  private prepared(database: Database.Database, sql: string, shape: Shape): Statement {
    const key = `${shape}:${sql}`
    let statement = this.statements.get(key)
    if (statement) {
      this.statements.delete(key) // re-inserted below: the map's order is least recently used first
    } else {
      const fresh = database.prepare<unknown[], unknown>(sql)
      statement = shape === 'pluck' ? fresh.pluck(true) : shape === 'raw' ? fresh.raw(true) : fresh
      if (this.statements.size >= MAX_STATEMENTS)
        this.statements.delete(this.statements.keys().next().value!)
    }
    this.statements.set(key, statement)
    return statement
  }

  /** Runs `read` on the statement: at once when the connection is open, else once it is. */
  private with<R>(sql: string, shape: Shape, read: (s: Statement) => R): R | Promise<R> {
    if (this.database) return read(this.prepared(this.database, sql, shape))
    return this.open().then((database) => read(this.prepared(database, sql, shape)))
  }

  /** The first row of `sql` as an object, or undefined. */
  async get<T extends object>(sql: string, ...params: unknown[]): Promise<T | undefined> {
    if (this.pooled) return (await this.pooledRows(sql, params))[0] as T | undefined
    return (await this.with(sql, 'object', (s) => s.get(...params))) as T | undefined
  }

  /** Every row as an array of its columns (no promise once the connection is open). */
  rows(sql: string, params: unknown[]): unknown[][] | Promise<unknown[][]> {
    if (this.pooled) return this.pooledRows(sql, params).then((rows) => rows.map(Object.values))
    return this.with(sql, 'raw', (s) => s.all(...params) as unknown[][])
  }

  /** The first column of every row (for long lists of ids: no array per row). */
  column(sql: string, params: unknown[]): number[] | Promise<number[]> {
    if (this.pooled)
      return this.pooledRows(sql, params).then((rows) =>
        rows.map((row) => Object.values(row)[0] as number),
      )
    return this.with(sql, 'pluck', (s) => s.all(...params) as number[])
  }

  close(): void {
    if (!this.pooled && this.dbName !== ':memory:') void this.opening?.then((d) => d.close())
  }
}

import type { ReadConnection } from '../common/read-connection'
import type { ListDialect } from './dataset-list-sql'

/** Runs the list's read-only statements and gives each row as an array of its columns. */
export interface ListReader {
  /** The SQL the database behind it speaks. */
  readonly dialect: ListDialect
  rows(sql: string, params: unknown[]): unknown[][] | Promise<unknown[][]>
  /** The first column of every row (for long lists of ids: no array per row). */
  column(sql: string, params: unknown[]): number[] | Promise<number[]>
}

/**
 * The list reads through the app's read-only connection (see ReadConnection): prepared
 * statements, and no promise per query once it is open.
 */
export const listReader = (connection: ReadConnection): ListReader => ({
  dialect: connection.dialect,
  rows: (sql, params) => connection.rows(sql, params),
  column: (sql, params) => connection.column(sql, params),
})

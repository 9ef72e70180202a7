import { createRequire } from 'node:module'

interface SqliteTransaction {
  query(connection: unknown, sql: string): Promise<unknown>
}

/**
 * Transactions on SQLite begin IMMEDIATE: they take the write lock at BEGIN. Begun deferred (the
 * query builder's only choice), a transaction that reads before it writes fixes a snapshot with
 * its read; if another connection commits before its first write, SQLite refuses the write at
 * once with SQLITE_BUSY_SNAPSHOT, without waiting out the busy timeout (sqlite.org/isolation.html).
 * Several processes write one file in the multi-process mode, so that happened to uploads
 * finishing while jobs recorded progress. Nearly every transaction here writes; the few that
 * only read give up nothing but the chance to overlap another writer.
 */
export function beginSqliteTransactionsImmediately(): void {
  // The query builder MikroORM's SQLite drivers use; its transaction class has no option for it.
  const require = createRequire(import.meta.url)
  const Transaction = require('knex/lib/dialects/sqlite3/execution/sqlite-transaction.js') as {
    prototype: SqliteTransaction & { begin(connection: unknown): Promise<unknown> }
  }
  Transaction.prototype.begin = function begin(this: SqliteTransaction, connection: unknown) {
    return this.query(connection, 'BEGIN IMMEDIATE;')
  }
}

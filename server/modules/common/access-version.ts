import type { EntityManager } from '@mikro-orm/better-sqlite'
import { closeSync, existsSync, openSync, readSync } from 'node:fs'
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

/** Both copies of the WAL-index header at the start of a `-shm` file (sqlite.org/walformat.html). */
const WAL_INDEX_HEADERS = 96

/**
 * The same read for the hot path, done once per request. On a database file it uses its own
 * read-only connection with the statement prepared once (microseconds, and it sees only committed
 * changes, never another request's open transaction). An in-memory database has no second
 * connection, so there it goes through the ORM, as on PostgreSQL (no file: `dbPath` null).
 *
 * In WAL mode every commit, by any connection of any process, rewrites the WAL-index header in
 * the `-shm` file before a reader can see it. So the header is read first (one pread) and the
 * statement runs only when it differs from the one read before the last statement: no commit
 * since then means the same version. (The read-only connection stays open as long as this
 * reader, so the `-shm` file it holds is never deleted or re-created under it.)
 */
export class AccessVersionReader {
  private readonly statement: Database.Statement<[], { value: number }> | null
  private readonly walIndex: { fd: number; seen: Buffer; now: Buffer } | null = null
  private version = 0

  constructor(
    dbPath: string | null,
    private readonly em: () => EntityManager,
  ) {
    if (dbPath === null || dbPath === ':memory:') {
      this.statement = null
      return
    }
    const db = new Database(dbPath, { readonly: true, fileMustExist: true })
    this.statement = db.prepare(SQL)
    // A first read attaches the connection to the `-shm` file before its header is opened below.
    this.version = this.statement.get()?.value ?? 0
    const walMode = db.pragma('journal_mode', { simple: true }) === 'wal'
    if (walMode && existsSync(`${dbPath}-shm`)) {
      const fd = openSync(`${dbPath}-shm`, 'r')
      // Never equal to a real header: the first read always runs the statement.
      const seen = Buffer.alloc(WAL_INDEX_HEADERS, 0xff)
      this.walIndex = { fd, seen, now: Buffer.alloc(WAL_INDEX_HEADERS) }
    }
  }

  /** The version without a promise, when this reader has its own connection; otherwise null. */
  readNow(): number | null {
    if (!this.statement) return null
    const wal = this.walIndex
    if (wal) {
      const read = readSync(wal.fd, wal.now, 0, WAL_INDEX_HEADERS, 0)
      if (read === WAL_INDEX_HEADERS && wal.now.equals(wal.seen)) return this.version
      // Read before the statement: a commit after this point shows as a change next time.
      if (read === WAL_INDEX_HEADERS) wal.now.copy(wal.seen)
      else wal.seen.fill(0xff)
    }
    // A first read attaches the connection to the `-shm` file before its header is opened below.
    this.version = this.statement.get()?.value ?? 0
    return this.version
  }

  async read(): Promise<number> {
    return this.readNow() ?? readAccessVersion(this.em())
  }

  close(): void {
    if (this.walIndex) closeSync(this.walIndex.fd)
    this.statement?.database.close()
  }
}

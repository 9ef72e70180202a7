import { resolve } from 'node:path'
import { Migrator } from '@mikro-orm/migrations'
import { defineConfig } from '@mikro-orm/better-sqlite'
import { loadConfig } from './server/config'
import { entities } from './server/entities'
import { migrationsList } from './server/migrations'

/**
 * The ORM configuration, used by the server and by the CLI (`npm run db -- migration:create`).
 * The database file lives in DATA_DIR; tests pass ':memory:' through createOrmConfig().
 */
export function createOrmConfig(dbName: string) {
  return defineConfig({
    dbName,
    entities,
    extensions: [Migrator],
    // The CLI writes new migrations here; add each one to server/migrations/index.ts.
    migrations: {
      path: resolve('server/migrations'),
      pathTs: resolve('server/migrations'),
      migrationsList,
      emit: 'ts',
      snapshot: false,
      silent: true,
    },
    pool: {
      // WAL lets readers run while a writer commits; one writer at a time is SQLite's own rule.
      afterCreate: (
        db: { pragma: (sql: string) => unknown },
        done: (err: Error | null, db: unknown) => void,
      ) => {
        try {
          db.pragma('journal_mode = WAL')
          db.pragma('foreign_keys = ON')
          db.pragma('busy_timeout = 5000')
          done(null, db)
        } catch (err) {
          done(err as Error, db)
        }
      },
    },
    // SQLite's own planner statistics (written by PRAGMA optimize) are not ours to diff, nor are
    // full-text indexes (virtual tables and their shadow tables, made by migrations: *_fts*).
    schemaGenerator: { skipTables: ['sqlite_stat1', 'sqlite_stat4', /_fts(_\w+)?$/] },
    debug: false,
    allowGlobalContext: false,
  })
}

/** For the ORM CLI: the same database file the server uses. */
export default createOrmConfig(loadConfig().dbPath)

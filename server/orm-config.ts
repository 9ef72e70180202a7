import { resolve } from 'node:path'
import type { MigrationsOptions } from '@mikro-orm/core'
import { Migrator } from '@mikro-orm/migrations'
import { defineConfig as defineSqliteConfig } from '@mikro-orm/better-sqlite'
import { entities } from './entities'
import { migrationsList } from './migrations'
import { postgresqlMigrationsList } from './migrations/postgresql'
import { beginSqliteTransactionsImmediately } from './sqlite-transactions'

/**
 * Each database keeps its own migrations (their SQL differs); the CLI writes a new one into the
 * folder of the database it is pointed at. List each in that folder's index.ts.
 */
const migrationsIn = (folder: string, list: MigrationsOptions['migrationsList']) => ({
  path: resolve(folder),
  pathTs: resolve(folder),
  migrationsList: list,
  emit: 'ts' as const,
  snapshot: false,
  silent: true,
})

/**
 * The embedded profile's configuration: a SQLite file in DATA_DIR (tests pass ':memory:').
 * Used by the server and by the CLI (`npm run db -- migration:create`).
 */
export function createSqliteConfig(dbName: string) {
  beginSqliteTransactionsImmediately()
  return defineSqliteConfig({
    dbName,
    entities,
    extensions: [Migrator],
    migrations: migrationsIn('server/migrations', migrationsList),
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

/**
 * The cluster profile's configuration: a PostgreSQL database named by DATABASE_URL. Its driver is
 * loaded only here, when asked for: the embedded profile never pays for loading it.
 */
export async function createPostgresqlConfig(clientUrl: string) {
  const { defineConfig } = await import('@mikro-orm/postgresql')
  return defineConfig({
    clientUrl,
    entities,
    extensions: [Migrator],
    migrations: migrationsIn('server/migrations/postgresql', postgresqlMigrationsList),
    // The full-text index and the nodes' coordination tables (made by migrations, not entities)
    // are not the diff's to drop.
    schemaGenerator: { skipTables: ['dataset_search', /^coordination_/] },
    debug: false,
    allowGlobalContext: false,
  })
}

/** The embedded profile's configuration for a SQLite file (tests pass ':memory:'). */
export const createOrmConfig = createSqliteConfig

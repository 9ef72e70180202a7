import { resolve } from 'node:path'
import { Migrator } from '@mikro-orm/migrations'
import { defineConfig } from '@mikro-orm/sqlite'
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
      afterCreate: (connection: { run: (sql: string, cb: (err: Error | null) => void) => void }, done: (err: Error | null, c: unknown) => void) => {
        connection.run('PRAGMA journal_mode = WAL', (err) => {
          if (err) return done(err, connection)
          connection.run('PRAGMA foreign_keys = ON', (err2) => done(err2, connection))
        })
      },
    },
    debug: false,
    allowGlobalContext: false,
  })
}

/** For the ORM CLI: the same database file the server uses. */
export default createOrmConfig(loadConfig().dbPath)

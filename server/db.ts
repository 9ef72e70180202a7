import { MikroORM } from '@mikro-orm/better-sqlite'
import { MikroORM as PostgreSqlOrm, PostgreSqlPlatform } from '@mikro-orm/postgresql'
import { createPostgresqlConfig, createSqliteConfig } from '../mikro-orm.config'
import type { DatabaseTarget } from './config'

/**
 * The open database. It is typed as the SQLite driver's ORM in both profiles: the modules use the
 * SQL EntityManager API both drivers share (queries, query builder, `execute`), and importing
 * their types from one driver package keeps them unchanged. What differs lives behind
 * `databaseDriver` and the few SQLite-only readers listed in docs/scale-out-notes.md.
 */
export type Orm = MikroORM

export type DatabaseDriver = DatabaseTarget['driver']

/**
 * Opens the database and brings its schema up to date with the committed migrations of its
 * driver. A string is a SQLite file (or ':memory:'); the configuration gives a DatabaseTarget.
 */
export async function openDatabase(target: DatabaseTarget | string): Promise<Orm> {
  const chosen: DatabaseTarget =
    typeof target === 'string' ? { driver: 'sqlite', path: target } : target
  const orm =
    chosen.driver === 'postgresql'
      ? ((await PostgreSqlOrm.init(createPostgresqlConfig(chosen.url))) as unknown as Orm)
      : await MikroORM.init(createSqliteConfig(chosen.path))
  await orm.getMigrator().up()
  await refreshPlannerStatistics(orm)
  return orm
}

/** The one question code asks when a database's SQL dialect matters (of an ORM or one of its EntityManagers). */
export function databaseDriver(db: Orm | Orm['em']): DatabaseDriver {
  const platform = 'em' in db ? db.em.getPlatform() : db.getPlatform()
  return platform instanceof PostgreSqlPlatform ? 'postgresql' : 'sqlite'
}

/**
 * The SQLite file a second, read-only connection may open for the hottest reads; null for an
 * in-memory database and on PostgreSQL (no file: those reads go through the ORM's connection).
 */
export function sqliteFileOf(orm: Orm): string | null {
  if (databaseDriver(orm) !== 'sqlite') return null
  const name = orm.config.get('dbName')
  return name && name !== ':memory:' ? name : null
}

/**
 * Lets SQLite refresh the statistics its query planner uses (ANALYZE where it is due). Without
 * them it may sort thousands of rows instead of walking an index for a page of 50. PostgreSQL's
 * autovacuum keeps its statistics itself.
 */
export async function refreshPlannerStatistics(orm: Orm): Promise<void> {
  if (databaseDriver(orm) === 'sqlite')
    await orm.em.getConnection().execute('PRAGMA optimize=0x10002')
}

import { MikroORM } from '@mikro-orm/better-sqlite'
import { createPostgresqlConfig, createSqliteConfig } from './orm-config'
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
  let orm: Orm
  if (chosen.driver === 'postgresql') {
    // Loaded only for this profile (it costs the embedded one most of a second at each start).
    const { MikroORM: PostgreSqlOrm } = await import('@mikro-orm/postgresql')
    orm = (await PostgreSqlOrm.init(await createPostgresqlConfig(chosen.url))) as unknown as Orm
  } else {
    orm = await MikroORM.init(createSqliteConfig(chosen.path))
  }
  drivers.set(orm.config, chosen.driver)
  const migrate = () => orm.getMigrator().up()
  // Nodes of the cluster profile that start together migrate one at a time.
  if (chosen.driver === 'postgresql') {
    const { whileHoldingStartupLock } = await import('./coordination/pg-startup-lock')
    await whileHoldingStartupLock(chosen.url, migrate)
  } else await migrate()
  await refreshPlannerStatistics(orm)
  return orm
}

/** The driver of each database opened here, by its configuration (shared by every fork). */
const drivers = new WeakMap<object, DatabaseDriver>()

/**
 * The one question code asks when a database's SQL dialect matters (of an ORM or one of its
 * EntityManagers). A database not opened by openDatabase is SQLite (tests of old migrations).
 */
export function databaseDriver(db: Orm | Orm['em']): DatabaseDriver {
  return drivers.get(db.config) ?? 'sqlite'
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

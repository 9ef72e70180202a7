import { MikroORM } from '@mikro-orm/better-sqlite'
import { createOrmConfig } from '../mikro-orm.config'

export type Orm = MikroORM

/** Opens the database and brings its schema up to date with the committed migrations. */
export async function openDatabase(dbName: string): Promise<Orm> {
  const orm = await MikroORM.init(createOrmConfig(dbName))
  await orm.getMigrator().up()
  await refreshPlannerStatistics(orm)
  return orm
}

/**
 * Lets SQLite refresh the statistics its query planner uses (ANALYZE where it is due). Without
 * them it may sort thousands of rows instead of walking an index for a page of 50.
 */
export async function refreshPlannerStatistics(orm: Orm): Promise<void> {
  await orm.em.getConnection().execute('PRAGMA optimize=0x10002')
}

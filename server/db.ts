import { MikroORM } from '@mikro-orm/sqlite'
import { createOrmConfig } from '../mikro-orm.config'

export type Orm = MikroORM

/** Opens the database and brings its schema up to date with the committed migrations. */
export async function openDatabase(dbName: string): Promise<Orm> {
  const orm = await MikroORM.init(createOrmConfig(dbName))
  await orm.getMigrator().up()
  return orm
}

import { loadConfig } from './server/config'
import { createPostgresqlConfig, createSqliteConfig } from './server/orm-config'

/**
 * For the ORM CLI: the database the server would open with the same environment. The builders
 * live in server/orm-config.ts, so that importing them does not read the environment (the server
 * reads it once, and explains a bad setting in words).
 */
const database = loadConfig().database
export default database.driver === 'postgresql'
  ? await createPostgresqlConfig(database.url)
  : createSqliteConfig(database.path)

import { Migration20261205020046 } from './Migration20261205020046'
import { Migration20261205020100 } from './Migration20261205020100'
import { Migration20261205022000 } from './Migration20261205022000'
import { Migration20261205030000 } from './Migration20261205030000'
import { Migration20261205050000 } from './Migration20261205050000'

/**
 * The PostgreSQL profile's migrations in the order they run: the same schema as the SQLite ones
 * beside this folder, in PostgreSQL's own SQL. `DATABASE_URL=postgres://… npm run db --
 * migration:create` writes new files here; list each one below.
 */
export const postgresqlMigrationsList = [
  { name: 'Migration20261205020046', class: Migration20261205020046 },
  { name: 'Migration20261205020100', class: Migration20261205020100 },
  { name: 'Migration20261205022000', class: Migration20261205022000 },
  { name: 'Migration20261205030000', class: Migration20261205030000 },
  { name: 'Migration20261205050000', class: Migration20261205050000 },
]

import { Migration20261201220545 } from './Migration20261201220545'

/**
 * Migrations in the order they run. `npm run db -- migration:create` writes new files here;
 * list each one below (static imports work under tsx, vitest and a bundle alike).
 */
export const migrationsList = [
  { name: 'Migration20261201220545', class: Migration20261201220545 },
]

import { Migration20261201224628 } from './Migration20261201224628'
import { Migration20261201230000 } from './Migration20261201230000'
import { Migration20261201231929 } from './Migration20261201231929'
import { Migration20261201233454 } from './Migration20261201233454'
import { Migration20261201233748 } from './Migration20261201233748'
import { Migration20261202022156 } from './Migration20261202022156'
import { Migration20261204133522 } from './Migration20261204133522'
import { Migration20261204141630 } from './Migration20261204141630'
import { Migration20261204143704 } from './Migration20261204143704'
import { Migration20261204151610 } from './Migration20261204151610'
import { Migration20261204193454 } from './Migration20261204193454'
import { Migration20261204221757 } from './Migration20261204221757'
import { Migration20261204221847 } from './Migration20261204221847'
import { Migration20261204221905 } from './Migration20261204221905'
import { Migration20261204223500 } from './Migration20261204223500'
import { Migration20261204224344 } from './Migration20261204224344'
/**
 * Migrations in the order they run. `npm run db -- migration:create` writes new files here;
 * list each one below (static imports work under tsx, vitest and a bundle alike).
 */
export const migrationsList = [
  { name: 'Migration20261201224628', class: Migration20261201224628 },
  { name: 'Migration20261201230000', class: Migration20261201230000 },
  { name: 'Migration20261201231929', class: Migration20261201231929 },
  { name: 'Migration20261201233454', class: Migration20261201233454 },
  { name: 'Migration20261201233748', class: Migration20261201233748 },
  { name: 'Migration20261202022156', class: Migration20261202022156 },
  { name: 'Migration20261204133522', class: Migration20261204133522 },
  { name: 'Migration20261204141630', class: Migration20261204141630 },
  { name: 'Migration20261204143704', class: Migration20261204143704 },
  { name: 'Migration20261204151610', class: Migration20261204151610 },
  { name: 'Migration20261204193454', class: Migration20261204193454 },
  { name: 'Migration20261204221757', class: Migration20261204221757 },
  { name: 'Migration20261204221847', class: Migration20261204221847 },
  { name: 'Migration20261204221905', class: Migration20261204221905 },
  { name: 'Migration20261204223500', class: Migration20261204223500 },
  { name: 'Migration20261204224344', class: Migration20261204224344 },
]

import { Migration } from '@mikro-orm/migrations'

/**
 * Audit details as `json` (the text as written) instead of `jsonb`, which sorts keys by length
 * and name: the audit log shows details in the order they were recorded. MikroORM's schema diff
 * counts both as JSON, so this one is written by hand.
 */
export class Migration20261205022000 extends Migration {
  override async up(): Promise<void> {
    this.addSql(`alter table "audit_event" alter column "details" type json using "details"::json;`)
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "audit_event" alter column "details" type jsonb using "details"::jsonb;`)
  }
}

import { Migration } from '@mikro-orm/migrations'

/**
 * Tables whose changes can change what someone may see, or how a listed dataset reads (the SQLite
 * migrations 20261201230000 and 20261204221905 list the same).
 */
const WATCHED: [table: string, updateOf?: string][] = [
  ['dataset'],
  ['dataset_share'],
  ['membership'],
  ['project'],
  ['user'],
  // last_used_at changes on every use and says nothing about access.
  ['api_token', '"revoked_at", "expires_at", "user_id"'],
  ['manuscript_dataset'],
  ['journal_editor'],
]

/**
 * What the SQLite migrations do with triggers, in PL/pgSQL:
 * - the access version (`sequence.access-version`), raised in the same transaction as any change
 *   of a watched table. Statement-level triggers: the value only has to move, and one update per
 *   statement keeps the hot row's dead versions few when a statement changes many rows.
 * - the append-only audit trail: any update, delete or truncate of audit_event aborts.
 * The full-text index (dataset_fts, FTS5) has no counterpart yet: see docs/scale-out-notes.md.
 */
export class Migration20261205020100 extends Migration {
  override async up(): Promise<void> {
    this.addSql(
      `insert into "sequence" ("name", "value") values ('access-version', 1) on conflict ("name") do nothing;`,
    )
    this.addSql(
      `create function "raise_access_version"() returns trigger language plpgsql as $$ begin update "sequence" set "value" = "value" + 1 where "name" = 'access-version'; return null; end $$;`,
    )
    for (const [table, updateOf] of WATCHED) {
      for (const event of ['insert', 'update', 'delete']) {
        const on = event === 'update' && updateOf ? `update of ${updateOf}` : event
        this.addSql(
          `create trigger "${table}_${event}_access_version" after ${on} on "${table}" for each statement execute function "raise_access_version"();`,
        )
      }
    }

    this.addSql(
      `create function "audit_event_append_only"() returns trigger language plpgsql as $$ begin raise exception 'audit events are append-only' using errcode = 'restrict_violation'; end $$;`,
    )
    for (const event of ['update', 'delete'])
      this.addSql(
        `create trigger "audit_event_no_${event}" before ${event} on "audit_event" for each row execute function "audit_event_append_only"();`,
      )
    this.addSql(
      `create trigger "audit_event_no_truncate" before truncate on "audit_event" for each statement execute function "audit_event_append_only"();`,
    )
  }

  override async down(): Promise<void> {
    for (const [table] of WATCHED)
      for (const event of ['insert', 'update', 'delete'])
        this.addSql(`drop trigger if exists "${table}_${event}_access_version" on "${table}";`)
    for (const event of ['update', 'delete', 'truncate'])
      this.addSql(`drop trigger if exists "audit_event_no_${event}" on "audit_event";`)
    this.addSql(`drop function if exists "raise_access_version"();`)
    this.addSql(`drop function if exists "audit_event_append_only"();`)
    this.addSql(`delete from "sequence" where "name" = 'access-version';`)
  }
}

import { Migration } from '@mikro-orm/migrations'

/**
 * What app nodes on several machines share beyond the entities (server/coordination/), on the
 * PostgreSQL profile only (one process or one host needs none of it): rate-limit counts and
 * dataset events too large for a notification (both unlogged: worthless after a crash of the
 * database, and cheaper without the write-ahead log), the last claimed tick of each schedule,
 * and the secrets every node must agree on when the operator set none (session cookies, the
 * stand-in identity provider's client secret, cookie key and signing key). No entity maps
 * them, so the schema diff leaves them alone (`skipTables` in server/orm-config.ts).
 */
export class Migration20261205050000 extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create unlogged table "coordination_rate_limit" (
      "key" text primary key,
      "hits" int not null,
      "reset_at" timestamptz not null
    );`)
    this.addSql(`create unlogged table "coordination_event_payload" (
      "id" bigserial primary key,
      "body" text not null,
      "created_at" timestamptz not null default now()
    );`)
    this.addSql(`create table "coordination_tick" (
      "name" text primary key,
      "last_at" timestamptz not null
    );`)
    this.addSql(`create table "coordination_secret" (
      "name" text primary key,
      "value" text not null
    );`)
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "coordination_secret";`)
    this.addSql(`drop table if exists "coordination_tick";`)
    this.addSql(`drop table if exists "coordination_event_payload";`)
    this.addSql(`drop table if exists "coordination_rate_limit";`)
  }
}

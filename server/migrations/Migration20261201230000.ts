import { Migration } from '@mikro-orm/migrations'

/** Tables whose changes can change what someone may see, or how a listed dataset reads. */
const WATCHED: [table: string, updateOf?: string][] = [
  ['dataset'],
  ['dataset_share'],
  ['membership'],
  ['project'],
  ['user'],
  // last_used_at changes on every use and says nothing about access.
  ['api_token', 'revoked_at, expires_at, user_id'],
]

/**
 * The access version: one counter that SQLite itself raises, in the same transaction, whenever a
 * watched table changes. Caches of abilities and list counts compare it to know they are current,
 * across every process sharing the database.
 */
export class Migration20261201230000 extends Migration {
  override async up(): Promise<void> {
    this.addSql("insert into `sequence` (`name`, `value`) values ('access-version', 1) on conflict (`name`) do nothing;")
    for (const [table, updateOf] of WATCHED) {
      for (const event of ['insert', 'update', 'delete']) {
        const on = event === 'update' && updateOf ? `update of ${updateOf}` : event
        this.addSql(
          `create trigger \`${table}_${event}_access_version\` after ${on} on \`${table}\` begin update \`sequence\` set \`value\` = \`value\` + 1 where \`name\` = 'access-version'; end;`,
        )
      }
    }
  }

  override async down(): Promise<void> {
    for (const [table] of WATCHED) {
      for (const event of ['insert', 'update', 'delete']) this.addSql(`drop trigger if exists \`${table}_${event}_access_version\`;`)
    }
  }
}

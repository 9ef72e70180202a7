import { Migration } from '@mikro-orm/migrations'

/**
 * Embargo reminders and releases done by the scheduler, deactivated users, and an audit trail the
 * database itself keeps append-only (any update or delete of a row aborts its statement).
 */
export class Migration20261204221757 extends Migration {
  override async up(): Promise<void> {
    this.addSql(
      `create table \`embargo_notice\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`kind\` text not null, \`embargo_until\` datetime not null, \`done_at\` datetime not null, constraint \`embargo_notice_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade);`,
    )
    this.addSql(
      `create index \`embargo_notice_dataset_id_index\` on \`embargo_notice\` (\`dataset_id\`);`,
    )
    this.addSql(
      `create unique index \`embargo_notice_dataset_id_kind_embargo_until_unique\` on \`embargo_notice\` (\`dataset_id\`, \`kind\`, \`embargo_until\`);`,
    )
    this.addSql(`alter table \`user\` add column \`deactivated_at\` datetime null;`)
    for (const event of ['update', 'delete'])
      this.addSql(
        `create trigger \`audit_event_no_${event}\` before ${event} on \`audit_event\` begin select raise(abort, 'audit events are append-only'); end;`,
      )
  }

  override async down(): Promise<void> {
    for (const event of ['update', 'delete'])
      this.addSql(`drop trigger if exists \`audit_event_no_${event}\`;`)
    this.addSql(`drop table if exists \`embargo_notice\`;`)
    this.addSql(`alter table \`user\` drop column \`deactivated_at\`;`)
  }
}

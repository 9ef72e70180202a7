import { Migration } from '@mikro-orm/migrations';

/** Tables that decide what a journal editor may read: they raise the access version too. */
const WATCHED = ['manuscript_dataset', 'journal_editor'];

/** Journals, their editors, manuscripts with their datasets, and reviewer links. */
export class Migration20261204221905 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`journal\` (\`id\` integer not null primary key autoincrement, \`name\` text not null, \`created_at\` datetime not null);`);
    this.addSql(`create unique index \`journal_name_unique\` on \`journal\` (\`name\`);`);

    this.addSql(`create table \`manuscript\` (\`id\` integer not null primary key autoincrement, \`journal_id\` integer not null, \`reference\` text not null, \`title\` text not null, \`created_by_id\` integer null, \`created_at\` datetime not null, constraint \`manuscript_journal_id_foreign\` foreign key(\`journal_id\`) references \`journal\`(\`id\`) on update cascade, constraint \`manuscript_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`manuscript_journal_id_index\` on \`manuscript\` (\`journal_id\`);`);
    this.addSql(`create index \`manuscript_created_by_id_index\` on \`manuscript\` (\`created_by_id\`);`);
    this.addSql(`create unique index \`manuscript_journal_id_reference_unique\` on \`manuscript\` (\`journal_id\`, \`reference\`);`);

    this.addSql(`create table \`journal_editor\` (\`id\` integer not null primary key autoincrement, \`journal_id\` integer not null, \`user_id\` integer not null, constraint \`journal_editor_journal_id_foreign\` foreign key(\`journal_id\`) references \`journal\`(\`id\`) on delete cascade on update cascade, constraint \`journal_editor_user_id_foreign\` foreign key(\`user_id\`) references \`user\`(\`id\`) on delete cascade on update cascade);`);
    this.addSql(`create index \`journal_editor_journal_id_index\` on \`journal_editor\` (\`journal_id\`);`);
    this.addSql(`create index \`journal_editor_user_id_index\` on \`journal_editor\` (\`user_id\`);`);
    this.addSql(`create unique index \`journal_editor_journal_id_user_id_unique\` on \`journal_editor\` (\`journal_id\`, \`user_id\`);`);

    this.addSql(`create table \`reviewer_link\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`version\` integer not null default 1, \`token_hash\` text not null, \`anonymous\` integer not null default false, \`expires_at\` datetime not null, \`revoked_at\` datetime null, \`created_by_id\` integer null, \`created_at\` datetime not null, \`demo\` integer not null default false, constraint \`reviewer_link_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`reviewer_link_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`reviewer_link_dataset_id_index\` on \`reviewer_link\` (\`dataset_id\`);`);
    this.addSql(`create unique index \`reviewer_link_token_hash_unique\` on \`reviewer_link\` (\`token_hash\`);`);
    this.addSql(`create index \`reviewer_link_created_by_id_index\` on \`reviewer_link\` (\`created_by_id\`);`);

    this.addSql(`create table \`manuscript_dataset\` (\`id\` integer not null primary key autoincrement, \`manuscript_id\` integer not null, \`dataset_id\` integer not null, \`attached_by_id\` integer null, \`attached_at\` datetime not null, constraint \`manuscript_dataset_manuscript_id_foreign\` foreign key(\`manuscript_id\`) references \`manuscript\`(\`id\`) on delete cascade on update cascade, constraint \`manuscript_dataset_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`manuscript_dataset_attached_by_id_foreign\` foreign key(\`attached_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`manuscript_dataset_manuscript_id_index\` on \`manuscript_dataset\` (\`manuscript_id\`);`);
    this.addSql(`create index \`manuscript_dataset_dataset_id_index\` on \`manuscript_dataset\` (\`dataset_id\`);`);
    this.addSql(`create index \`manuscript_dataset_attached_by_id_index\` on \`manuscript_dataset\` (\`attached_by_id\`);`);
    this.addSql(`create unique index \`manuscript_dataset_manuscript_id_dataset_id_unique\` on \`manuscript_dataset\` (\`manuscript_id\`, \`dataset_id\`);`);
    for (const table of WATCHED) {
      for (const event of ['insert', 'update', 'delete']) {
        this.addSql(
          `create trigger \`${table}_${event}_access_version\` after ${event} on \`${table}\` begin update \`sequence\` set \`value\` = \`value\` + 1 where \`name\` = 'access-version'; end;`,
        );
      }
    }
  }

}

import { Migration } from '@mikro-orm/migrations';

export class Migration20261204224344 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`dataset_version\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`number\` integer not null, \`label\` text not null, \`title\` text not null, \`description\` text not null default '', \`licence\` text not null, \`metadata\` json not null, \`approved_at\` datetime not null, \`approved_by_id\` integer null, \`doi\` text null, \`doi_status\` text not null default 'pending', \`doi_attempts\` integer not null default 0, \`doi_next_attempt_at\` datetime null, \`doi_error\` text null, \`doi_failed_at\` datetime null, constraint \`dataset_version_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`dataset_version_approved_by_id_foreign\` foreign key(\`approved_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`dataset_version_dataset_id_index\` on \`dataset_version\` (\`dataset_id\`);`);
    this.addSql(`create unique index \`dataset_version_label_unique\` on \`dataset_version\` (\`label\`);`);
    this.addSql(`create index \`dataset_version_approved_by_id_index\` on \`dataset_version\` (\`approved_by_id\`);`);
    this.addSql(`create index \`dataset_version_doi_status_doi_next_attempt_at_index\` on \`dataset_version\` (\`doi_status\`, \`doi_next_attempt_at\`);`);
    this.addSql(`create unique index \`dataset_version_dataset_id_number_unique\` on \`dataset_version\` (\`dataset_id\`, \`number\`);`);

    this.addSql(`create table \`curation_entry\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`step\` text not null, \`version\` integer not null, \`actor_id\` integer null, \`comment\` text not null default '', \`checks\` json not null, \`checklist\` json not null, \`created_at\` datetime not null, constraint \`curation_entry_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`curation_entry_actor_id_foreign\` foreign key(\`actor_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`curation_entry_dataset_id_index\` on \`curation_entry\` (\`dataset_id\`);`);
    this.addSql(`create index \`curation_entry_actor_id_index\` on \`curation_entry\` (\`actor_id\`);`);
    this.addSql(`create index \`curation_entry_dataset_id_id_index\` on \`curation_entry\` (\`dataset_id\`, \`id\`);`);

    this.addSql(`create table \`version_blob\` (\`id\` integer not null primary key autoincrement, \`sha256\` text not null, \`size\` bigint not null, \`created_at\` datetime not null);`);
    this.addSql(`create unique index \`version_blob_sha256_unique\` on \`version_blob\` (\`sha256\`);`);

    this.addSql(`create table \`version_file\` (\`id\` integer not null primary key autoincrement, \`version_id\` integer not null, \`blob_id\` integer not null, \`name\` text not null, \`size\` bigint not null, \`sha256\` text not null, constraint \`version_file_version_id_foreign\` foreign key(\`version_id\`) references \`dataset_version\`(\`id\`) on delete cascade on update cascade, constraint \`version_file_blob_id_foreign\` foreign key(\`blob_id\`) references \`version_blob\`(\`id\`) on update cascade);`);
    this.addSql(`create index \`version_file_version_id_index\` on \`version_file\` (\`version_id\`);`);
    this.addSql(`create index \`version_file_blob_id_index\` on \`version_file\` (\`blob_id\`);`);
    this.addSql(`create unique index \`version_file_version_id_name_unique\` on \`version_file\` (\`version_id\`, \`name\`);`);
  }

}

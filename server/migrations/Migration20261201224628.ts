import { Migration } from '@mikro-orm/migrations';

export class Migration20261201224628 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`organization\` (\`id\` integer not null primary key autoincrement, \`name\` text not null, \`kind\` text not null default 'lab', \`email_domain\` text null, \`created_at\` datetime not null);`);
    this.addSql(`create unique index \`organization_name_unique\` on \`organization\` (\`name\`);`);
    this.addSql(`create unique index \`organization_email_domain_unique\` on \`organization\` (\`email_domain\`);`);

    this.addSql(`create table \`sequence\` (\`name\` text not null, \`value\` integer not null default 0, primary key (\`name\`));`);

    this.addSql(`create table \`session\` (\`sid\` text not null, \`data\` json not null, \`expires_at\` datetime not null, primary key (\`sid\`));`);
    this.addSql(`create index \`session_expires_at_index\` on \`session\` (\`expires_at\`);`);

    this.addSql(`create table \`user\` (\`id\` integer not null primary key autoincrement, \`subject\` text null, \`email\` text not null, \`name\` text not null, \`site_role\` text null, \`organization_id\` integer null, \`created_at\` datetime not null, \`last_sign_in_at\` datetime null, constraint \`user_organization_id_foreign\` foreign key(\`organization_id\`) references \`organization\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create unique index \`user_subject_unique\` on \`user\` (\`subject\`);`);
    this.addSql(`create unique index \`user_email_unique\` on \`user\` (\`email\`);`);
    this.addSql(`create index \`user_organization_id_index\` on \`user\` (\`organization_id\`);`);

    this.addSql(`create table \`project\` (\`id\` integer not null primary key autoincrement, \`name\` text not null, \`description\` text not null default '', \`organization_id\` integer null, \`created_by_id\` integer null, \`created_at\` datetime not null, constraint \`project_organization_id_foreign\` foreign key(\`organization_id\`) references \`organization\`(\`id\`) on delete set null on update cascade, constraint \`project_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create unique index \`project_name_unique\` on \`project\` (\`name\`);`);
    this.addSql(`create index \`project_organization_id_index\` on \`project\` (\`organization_id\`);`);
    this.addSql(`create index \`project_created_by_id_index\` on \`project\` (\`created_by_id\`);`);

    this.addSql(`create table \`membership\` (\`id\` integer not null primary key autoincrement, \`project_id\` integer not null, \`user_id\` integer not null, \`role\` text not null, \`created_at\` datetime not null, constraint \`membership_project_id_foreign\` foreign key(\`project_id\`) references \`project\`(\`id\`) on delete cascade on update cascade, constraint \`membership_user_id_foreign\` foreign key(\`user_id\`) references \`user\`(\`id\`) on update cascade);`);
    this.addSql(`create index \`membership_project_id_index\` on \`membership\` (\`project_id\`);`);
    this.addSql(`create index \`membership_user_id_index\` on \`membership\` (\`user_id\`);`);
    this.addSql(`create unique index \`membership_project_id_user_id_unique\` on \`membership\` (\`project_id\`, \`user_id\`);`);

    this.addSql(`create table \`dataset\` (\`id\` integer not null primary key autoincrement, \`accession\` text not null, \`title\` text not null, \`description\` text not null default '', \`project_id\` integer not null, \`state\` text not null default 'draft', \`embargo_until\` datetime null, \`proposed_embargo_until\` datetime null, \`licence\` text not null default 'CC-BY-4.0', \`version\` integer not null default 1, \`created_by_id\` integer null, \`created_at\` datetime not null, \`updated_at\` datetime not null, \`submitted_at\` datetime null, \`approved_at\` datetime null, constraint \`dataset_project_id_foreign\` foreign key(\`project_id\`) references \`project\`(\`id\`) on update cascade, constraint \`dataset_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create unique index \`dataset_accession_unique\` on \`dataset\` (\`accession\`);`);
    this.addSql(`create index \`dataset_project_id_index\` on \`dataset\` (\`project_id\`);`);
    this.addSql(`create index \`dataset_created_by_id_index\` on \`dataset\` (\`created_by_id\`);`);
    this.addSql(`create index \`dataset_created_at_index\` on \`dataset\` (\`created_at\`);`);
    this.addSql(`create index \`dataset_updated_at_index\` on \`dataset\` (\`updated_at\`);`);
    this.addSql(`create index \`dataset_title_index\` on \`dataset\` (\`title\`);`);
    this.addSql(`create index \`dataset_project_id_created_at_index\` on \`dataset\` (\`project_id\`, \`created_at\`);`);
    this.addSql(`create index \`dataset_state_project_id_index\` on \`dataset\` (\`state\`, \`project_id\`);`);

    this.addSql(`create table \`dataset_share\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`user_id\` integer not null, \`capabilities\` json not null, \`created_by_id\` integer null, \`created_at\` datetime not null, constraint \`dataset_share_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`dataset_share_user_id_foreign\` foreign key(\`user_id\`) references \`user\`(\`id\`) on update cascade, constraint \`dataset_share_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`dataset_share_dataset_id_index\` on \`dataset_share\` (\`dataset_id\`);`);
    this.addSql(`create index \`dataset_share_user_id_index\` on \`dataset_share\` (\`user_id\`);`);
    this.addSql(`create index \`dataset_share_created_by_id_index\` on \`dataset_share\` (\`created_by_id\`);`);
    this.addSql(`create unique index \`dataset_share_dataset_id_user_id_unique\` on \`dataset_share\` (\`dataset_id\`, \`user_id\`);`);

    this.addSql(`create table \`dataset_file\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`name\` text not null, \`size\` bigint not null, \`sha256\` text null, \`kind\` text not null default 'other', \`status\` text not null default 'processing', \`storage_key\` text not null, \`media_type\` text null, \`created_by_id\` integer null, \`created_at\` datetime not null, constraint \`dataset_file_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`dataset_file_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`dataset_file_dataset_id_index\` on \`dataset_file\` (\`dataset_id\`);`);
    this.addSql(`create unique index \`dataset_file_storage_key_unique\` on \`dataset_file\` (\`storage_key\`);`);
    this.addSql(`create index \`dataset_file_created_by_id_index\` on \`dataset_file\` (\`created_by_id\`);`);
    this.addSql(`create index \`dataset_file_dataset_id_name_index\` on \`dataset_file\` (\`dataset_id\`, \`name\`);`);
    this.addSql(`create index \`dataset_file_dataset_id_sha256_index\` on \`dataset_file\` (\`dataset_id\`, \`sha256\`);`);

    this.addSql(`create table \`comment\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`author_id\` integer not null, \`body\` text not null, \`region\` json null, \`reply_to\` integer null, \`created_at\` datetime not null, constraint \`comment_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`comment_author_id_foreign\` foreign key(\`author_id\`) references \`user\`(\`id\`) on update cascade);`);
    this.addSql(`create index \`comment_dataset_id_index\` on \`comment\` (\`dataset_id\`);`);
    this.addSql(`create index \`comment_author_id_index\` on \`comment\` (\`author_id\`);`);
    this.addSql(`create index \`comment_dataset_id_created_at_index\` on \`comment\` (\`dataset_id\`, \`created_at\`);`);

    this.addSql(`create table \`audit_event\` (\`id\` integer not null primary key autoincrement, \`actor_id\` integer null, \`action\` text not null, \`target_type\` text not null, \`target_id\` text not null, \`time\` datetime not null, \`address\` text null, \`details\` json null, constraint \`audit_event_actor_id_foreign\` foreign key(\`actor_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`audit_event_actor_id_index\` on \`audit_event\` (\`actor_id\`);`);
    this.addSql(`create index \`audit_event_target_type_target_id_index\` on \`audit_event\` (\`target_type\`, \`target_id\`);`);
    this.addSql(`create index \`audit_event_time_index\` on \`audit_event\` (\`time\`);`);

    this.addSql(`create table \`api_token\` (\`id\` integer not null primary key autoincrement, \`user_id\` integer not null, \`name\` text not null, \`token_hash\` text not null, \`prefix\` text not null, \`created_at\` datetime not null, \`last_used_at\` datetime null, \`expires_at\` datetime null, \`revoked_at\` datetime null, constraint \`api_token_user_id_foreign\` foreign key(\`user_id\`) references \`user\`(\`id\`) on update cascade);`);
    this.addSql(`create index \`api_token_user_id_index\` on \`api_token\` (\`user_id\`);`);
    this.addSql(`create unique index \`api_token_token_hash_unique\` on \`api_token\` (\`token_hash\`);`);
  }

}

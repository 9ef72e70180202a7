import { Migration } from '@mikro-orm/migrations';

/**
 * The whole schema of the SQLite migrations up to 20261204224344, as MikroORM's generator writes
 * it for PostgreSQL from the entities (later changes get migrations of their own here too).
 */
export class Migration20261205020046 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "journal" ("id" serial primary key, "name" varchar(255) not null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "journal" add constraint "journal_name_unique" unique ("name");`);

    this.addSql(`create table "oidc_payload" ("model" varchar(255) not null, "id" varchar(255) not null, "payload" jsonb not null, "grant_id" varchar(255) null, "uid" varchar(255) null, "user_code" varchar(255) null, "expires_at" timestamptz null, constraint "oidc_payload_pkey" primary key ("model", "id"));`);
    this.addSql(`create index "oidc_payload_grant_id_index" on "oidc_payload" ("grant_id");`);
    this.addSql(`create index "oidc_payload_uid_index" on "oidc_payload" ("uid");`);
    this.addSql(`create index "oidc_payload_user_code_index" on "oidc_payload" ("user_code");`);
    this.addSql(`create index "oidc_payload_expires_at_index" on "oidc_payload" ("expires_at");`);

    this.addSql(`create table "organization" ("id" serial primary key, "name" varchar(255) not null, "kind" varchar(255) not null default 'lab', "email_domain" varchar(255) null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "organization" add constraint "organization_name_unique" unique ("name");`);
    this.addSql(`alter table "organization" add constraint "organization_email_domain_unique" unique ("email_domain");`);

    this.addSql(`create table "sequence" ("name" varchar(255) not null, "value" int not null default 0, constraint "sequence_pkey" primary key ("name"));`);

    this.addSql(`create table "session" ("sid" varchar(255) not null, "data" jsonb not null, "expires_at" timestamptz not null, constraint "session_pkey" primary key ("sid"));`);
    this.addSql(`create index "session_expires_at_index" on "session" ("expires_at");`);

    this.addSql(`create table "user" ("id" serial primary key, "subject" varchar(255) null, "email" varchar(255) not null, "name" varchar(255) not null, "site_role" varchar(255) null, "organization_id" int null, "created_at" timestamptz not null, "last_sign_in_at" timestamptz null, "deactivated_at" timestamptz null);`);
    this.addSql(`alter table "user" add constraint "user_subject_unique" unique ("subject");`);
    this.addSql(`alter table "user" add constraint "user_email_unique" unique ("email");`);

    this.addSql(`create table "project" ("id" serial primary key, "name" varchar(255) not null, "description" text not null default '', "organization_id" int null, "created_by_id" int null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "project" add constraint "project_name_unique" unique ("name");`);

    this.addSql(`create table "membership" ("id" serial primary key, "project_id" int not null, "user_id" int not null, "role" varchar(255) not null, "created_at" timestamptz not null);`);
    this.addSql(`create index "membership_user_id_index" on "membership" ("user_id");`);
    this.addSql(`alter table "membership" add constraint "membership_project_id_user_id_unique" unique ("project_id", "user_id");`);

    this.addSql(`create table "manuscript" ("id" serial primary key, "journal_id" int not null, "reference" varchar(255) not null, "title" varchar(255) not null, "created_by_id" int null, "created_at" timestamptz not null);`);
    this.addSql(`create index "manuscript_journal_id_index" on "manuscript" ("journal_id");`);
    this.addSql(`alter table "manuscript" add constraint "manuscript_journal_id_reference_unique" unique ("journal_id", "reference");`);

    this.addSql(`create table "journal_editor" ("id" serial primary key, "journal_id" int not null, "user_id" int not null);`);
    this.addSql(`create index "journal_editor_user_id_index" on "journal_editor" ("user_id");`);
    this.addSql(`alter table "journal_editor" add constraint "journal_editor_journal_id_user_id_unique" unique ("journal_id", "user_id");`);

    this.addSql(`create table "instrument_profile" ("id" serial primary key, "organization_id" int null, "name" varchar(255) not null, "instrument" jsonb not null, "created_by_id" int null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "instrument_profile" add constraint "instrument_profile_organization_id_name_unique" unique ("organization_id", "name");`);

    this.addSql(`create table "dataset" ("id" serial primary key, "accession" varchar(255) not null, "title" varchar(255) not null, "description" text not null default '', "project_id" int not null, "state" varchar(255) not null default 'draft', "embargo_until" timestamptz null, "proposed_embargo_until" timestamptz null, "licence" varchar(255) not null default 'CC-BY-4.0', "version" int not null default 1, "created_by_id" int null, "created_at" timestamptz not null, "updated_at" timestamptz not null, "submitted_at" timestamptz null, "approved_at" timestamptz null);`);
    this.addSql(`alter table "dataset" add constraint "dataset_accession_unique" unique ("accession");`);
    this.addSql(`create index "dataset_list_created_at_index" on "dataset" ("created_at", "id", "state", "project_id");`);
    this.addSql(`create index "dataset_list_updated_at_index" on "dataset" ("updated_at", "id", "state", "project_id");`);
    this.addSql(`create index "dataset_list_title_index" on "dataset" ("title", "id", "state", "project_id");`);
    this.addSql(`create index "dataset_list_accession_index" on "dataset" ("accession", "id", "state", "project_id");`);
    this.addSql(`create index "dataset_list_state_index" on "dataset" ("state", "id", "project_id");`);
    this.addSql(`create index "dataset_project_id_created_at_index" on "dataset" ("project_id", "created_at");`);
    this.addSql(`create index "dataset_state_project_id_index" on "dataset" ("state", "project_id");`);

    this.addSql(`create table "upload_reservation" ("upload_id" varchar(255) not null, "project_id" int not null, "dataset_id" int not null, "user_id" int not null, "file_name" varchar(255) not null, "size" bigint not null, "created_at" timestamptz not null, constraint "upload_reservation_pkey" primary key ("upload_id"));`);
    this.addSql(`create index "upload_reservation_project_id_index" on "upload_reservation" ("project_id");`);
    this.addSql(`create index "upload_reservation_dataset_id_index" on "upload_reservation" ("dataset_id");`);

    this.addSql(`create table "reviewer_link" ("id" serial primary key, "dataset_id" int not null, "version" int not null default 1, "token_hash" varchar(255) not null, "anonymous" boolean not null default false, "expires_at" timestamptz not null, "revoked_at" timestamptz null, "created_by_id" int null, "created_at" timestamptz not null, "demo" boolean not null default false);`);
    this.addSql(`create index "reviewer_link_dataset_id_index" on "reviewer_link" ("dataset_id");`);
    this.addSql(`alter table "reviewer_link" add constraint "reviewer_link_token_hash_unique" unique ("token_hash");`);

    this.addSql(`create table "manuscript_dataset" ("id" serial primary key, "manuscript_id" int not null, "dataset_id" int not null, "attached_by_id" int null, "attached_at" timestamptz not null);`);
    this.addSql(`create index "manuscript_dataset_dataset_id_index" on "manuscript_dataset" ("dataset_id");`);
    this.addSql(`alter table "manuscript_dataset" add constraint "manuscript_dataset_manuscript_id_dataset_id_unique" unique ("manuscript_id", "dataset_id");`);

    this.addSql(`create table "embargo_notice" ("id" serial primary key, "dataset_id" int not null, "kind" varchar(255) not null, "embargo_until" timestamptz not null, "done_at" timestamptz not null);`);
    this.addSql(`alter table "embargo_notice" add constraint "embargo_notice_dataset_id_kind_embargo_until_unique" unique ("dataset_id", "kind", "embargo_until");`);

    this.addSql(`create table "dataset_version" ("id" serial primary key, "dataset_id" int not null, "number" int not null, "label" varchar(255) not null, "title" varchar(255) not null, "description" text not null default '', "licence" varchar(255) not null, "metadata" jsonb not null, "approved_at" timestamptz not null, "approved_by_id" int null, "doi" varchar(255) null, "doi_status" varchar(255) not null default 'pending', "doi_attempts" int not null default 0, "doi_next_attempt_at" timestamptz null, "doi_error" text null, "doi_failed_at" timestamptz null);`);
    this.addSql(`alter table "dataset_version" add constraint "dataset_version_label_unique" unique ("label");`);
    this.addSql(`create index "dataset_version_doi_status_doi_next_attempt_at_index" on "dataset_version" ("doi_status", "doi_next_attempt_at");`);
    this.addSql(`alter table "dataset_version" add constraint "dataset_version_dataset_id_number_unique" unique ("dataset_id", "number");`);

    this.addSql(`create table "dataset_share" ("id" serial primary key, "dataset_id" int not null, "user_id" int not null, "capabilities" jsonb not null, "created_by_id" int null, "created_at" timestamptz not null);`);
    this.addSql(`create index "dataset_share_user_id_index" on "dataset_share" ("user_id");`);
    this.addSql(`alter table "dataset_share" add constraint "dataset_share_dataset_id_user_id_unique" unique ("dataset_id", "user_id");`);

    this.addSql(`create table "dataset_metadata" ("dataset_id" int not null, "document" jsonb not null, "updated_by_id" int null, "updated_at" timestamptz not null, constraint "dataset_metadata_pkey" primary key ("dataset_id"));`);

    this.addSql(`create table "dataset_file" ("id" serial primary key, "dataset_id" int not null, "name" varchar(255) not null, "size" bigint not null, "derived_bytes" bigint not null default 0, "sha256" varchar(255) null, "kind" varchar(255) not null default 'other', "status" varchar(255) not null default 'processing', "storage_key" varchar(255) not null, "media_type" varchar(255) null, "problem" text null, "mapping" jsonb null, "report" jsonb null, "created_by_id" int null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "dataset_file" add constraint "dataset_file_storage_key_unique" unique ("storage_key");`);
    this.addSql(`create index "dataset_file_dataset_id_name_index" on "dataset_file" ("dataset_id", "name");`);
    this.addSql(`create index "dataset_file_dataset_id_sha256_index" on "dataset_file" ("dataset_id", "sha256");`);

    this.addSql(`create table "region" ("id" serial primary key, "dataset_id" int not null, "file_id" int not null, "author_id" int not null, "label" varchar(255) not null, "colour" varchar(255) not null, "shape" varchar(255) not null, "geometry" jsonb not null, "created_at" timestamptz not null, "updated_at" timestamptz not null);`);
    this.addSql(`create index "region_file_id_created_at_index" on "region" ("file_id", "created_at");`);
    this.addSql(`create index "region_dataset_id_created_at_index" on "region" ("dataset_id", "created_at");`);

    this.addSql(`create table "quality_report" ("id" serial primary key, "file_id" int not null, "findings" jsonb not null, "inputs" jsonb not null, "computed_at" timestamptz not null);`);
    this.addSql(`alter table "quality_report" add constraint "quality_report_file_id_unique" unique ("file_id");`);

    this.addSql(`create table "job" ("id" serial primary key, "kind" varchar(255) not null, "payload" jsonb not null, "subject_type" varchar(255) not null default 'file', "subject_id" int not null default 0, "dedupe_key" varchar(255) not null default '', "after_kinds" varchar(255) not null default '', "state" varchar(255) not null default 'queued', "priority" int not null default 0, "cancel_requested" boolean not null default false, "progress" real not null default 0, "message" varchar(255) null, "error" text null, "attempts" int not null default 0, "file_id" int null, "created_at" timestamptz not null, "started_at" timestamptz null, "heartbeat_at" timestamptz null, "finished_at" timestamptz null);`);
    this.addSql(`create index "job_file_id_index" on "job" ("file_id");`);
    this.addSql(`create index "job_state_priority_id_index" on "job" ("state", "priority", "id");`);
    this.addSql(`create index "job_subject_type_subject_id_index" on "job" ("subject_type", "subject_id");`);
    this.addSql(`create index "job_kind_dedupe_key_index" on "job" ("kind", "dedupe_key");`);

    this.addSql(`create table "curation_entry" ("id" serial primary key, "dataset_id" int not null, "step" varchar(255) not null, "version" int not null, "actor_id" int null, "comment" text not null default '', "checks" jsonb not null, "checklist" jsonb not null, "created_at" timestamptz not null);`);
    this.addSql(`create index "curation_entry_dataset_id_id_index" on "curation_entry" ("dataset_id", "id");`);

    this.addSql(`create table "comment" ("id" serial primary key, "dataset_id" int not null, "region_id" int null, "author_id" int not null, "body" text not null, "body_html" text not null default '', "reply_to" int null, "created_at" timestamptz not null, "edited_at" timestamptz null, "resolved_at" timestamptz null, "resolved_by_id" int null);`);
    this.addSql(`create index "comment_dataset_id_created_at_index" on "comment" ("dataset_id", "created_at");`);
    this.addSql(`create index "comment_region_id_created_at_index" on "comment" ("region_id", "created_at");`);

    this.addSql(`create table "comment_mention" ("id" serial primary key, "comment_id" int not null, "user_id" int not null);`);
    this.addSql(`create index "comment_mention_user_id_comment_id_index" on "comment_mention" ("user_id", "comment_id");`);
    this.addSql(`alter table "comment_mention" add constraint "comment_mention_comment_id_user_id_unique" unique ("comment_id", "user_id");`);

    this.addSql(`create table "audit_event" ("id" serial primary key, "actor_id" int null, "action" varchar(255) not null, "target_type" varchar(255) not null, "target_id" varchar(255) not null, "time" timestamptz not null, "address" varchar(255) null, "details" jsonb null);`);
    this.addSql(`create index "audit_event_target_type_target_id_index" on "audit_event" ("target_type", "target_id");`);
    this.addSql(`create index "audit_event_time_index" on "audit_event" ("time");`);

    this.addSql(`create table "api_token" ("id" serial primary key, "user_id" int not null, "name" varchar(255) not null, "token_hash" varchar(255) not null, "prefix" varchar(255) not null, "created_at" timestamptz not null, "last_used_at" timestamptz null, "expires_at" timestamptz null, "revoked_at" timestamptz null);`);
    this.addSql(`create index "api_token_user_id_index" on "api_token" ("user_id");`);
    this.addSql(`alter table "api_token" add constraint "api_token_token_hash_unique" unique ("token_hash");`);

    this.addSql(`create table "version_blob" ("id" serial primary key, "sha256" varchar(255) not null, "size" bigint not null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "version_blob" add constraint "version_blob_sha256_unique" unique ("sha256");`);

    this.addSql(`create table "version_file" ("id" serial primary key, "version_id" int not null, "blob_id" int not null, "name" varchar(255) not null, "size" bigint not null, "sha256" varchar(255) not null);`);
    this.addSql(`alter table "version_file" add constraint "version_file_version_id_name_unique" unique ("version_id", "name");`);

    this.addSql(`alter table "user" add constraint "user_organization_id_foreign" foreign key ("organization_id") references "organization" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "project" add constraint "project_organization_id_foreign" foreign key ("organization_id") references "organization" ("id") on update cascade on delete set null;`);
    this.addSql(`alter table "project" add constraint "project_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "membership" add constraint "membership_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "membership" add constraint "membership_user_id_foreign" foreign key ("user_id") references "user" ("id") on update cascade;`);

    this.addSql(`alter table "manuscript" add constraint "manuscript_journal_id_foreign" foreign key ("journal_id") references "journal" ("id") on update cascade;`);
    this.addSql(`alter table "manuscript" add constraint "manuscript_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "journal_editor" add constraint "journal_editor_journal_id_foreign" foreign key ("journal_id") references "journal" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "journal_editor" add constraint "journal_editor_user_id_foreign" foreign key ("user_id") references "user" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "instrument_profile" add constraint "instrument_profile_organization_id_foreign" foreign key ("organization_id") references "organization" ("id") on update cascade on delete set null;`);
    this.addSql(`alter table "instrument_profile" add constraint "instrument_profile_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "dataset" add constraint "dataset_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade;`);
    this.addSql(`alter table "dataset" add constraint "dataset_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "upload_reservation" add constraint "upload_reservation_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade;`);
    this.addSql(`alter table "upload_reservation" add constraint "upload_reservation_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "upload_reservation" add constraint "upload_reservation_user_id_foreign" foreign key ("user_id") references "user" ("id") on update cascade;`);

    this.addSql(`alter table "reviewer_link" add constraint "reviewer_link_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "reviewer_link" add constraint "reviewer_link_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "manuscript_dataset" add constraint "manuscript_dataset_manuscript_id_foreign" foreign key ("manuscript_id") references "manuscript" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "manuscript_dataset" add constraint "manuscript_dataset_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "manuscript_dataset" add constraint "manuscript_dataset_attached_by_id_foreign" foreign key ("attached_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "embargo_notice" add constraint "embargo_notice_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "dataset_version" add constraint "dataset_version_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "dataset_version" add constraint "dataset_version_approved_by_id_foreign" foreign key ("approved_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "dataset_share" add constraint "dataset_share_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "dataset_share" add constraint "dataset_share_user_id_foreign" foreign key ("user_id") references "user" ("id") on update cascade;`);
    this.addSql(`alter table "dataset_share" add constraint "dataset_share_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "dataset_metadata" add constraint "dataset_metadata_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "dataset_metadata" add constraint "dataset_metadata_updated_by_id_foreign" foreign key ("updated_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "dataset_file" add constraint "dataset_file_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "dataset_file" add constraint "dataset_file_created_by_id_foreign" foreign key ("created_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "region" add constraint "region_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "region" add constraint "region_file_id_foreign" foreign key ("file_id") references "dataset_file" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "region" add constraint "region_author_id_foreign" foreign key ("author_id") references "user" ("id") on update cascade;`);

    this.addSql(`alter table "quality_report" add constraint "quality_report_file_id_foreign" foreign key ("file_id") references "dataset_file" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "job" add constraint "job_file_id_foreign" foreign key ("file_id") references "dataset_file" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "curation_entry" add constraint "curation_entry_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "curation_entry" add constraint "curation_entry_actor_id_foreign" foreign key ("actor_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "comment" add constraint "comment_dataset_id_foreign" foreign key ("dataset_id") references "dataset" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "comment" add constraint "comment_region_id_foreign" foreign key ("region_id") references "region" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "comment" add constraint "comment_author_id_foreign" foreign key ("author_id") references "user" ("id") on update cascade;`);
    this.addSql(`alter table "comment" add constraint "comment_resolved_by_id_foreign" foreign key ("resolved_by_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "comment_mention" add constraint "comment_mention_comment_id_foreign" foreign key ("comment_id") references "comment" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "comment_mention" add constraint "comment_mention_user_id_foreign" foreign key ("user_id") references "user" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "audit_event" add constraint "audit_event_actor_id_foreign" foreign key ("actor_id") references "user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "api_token" add constraint "api_token_user_id_foreign" foreign key ("user_id") references "user" ("id") on update cascade;`);

    this.addSql(`alter table "version_file" add constraint "version_file_version_id_foreign" foreign key ("version_id") references "dataset_version" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "version_file" add constraint "version_file_blob_id_foreign" foreign key ("blob_id") references "version_blob" ("id") on update cascade;`);
  }

}

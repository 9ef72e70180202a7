import { Migration } from '@mikro-orm/migrations';

/**
 * Typed jobs: each job names its subject, a dedupe key and the kinds it waits for; payloads hold
 * storage keys instead of absolute paths. Jobs of older releases get their subject from their file,
 * and the ones still to run get a storage key in place of their paths.
 */
export class Migration20261204133522 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table \`job\` add column \`subject_type\` text not null default 'file';`);
    this.addSql(`alter table \`job\` add column \`subject_id\` integer not null default 0;`);
    this.addSql(`alter table \`job\` add column \`dedupe_key\` text not null default '';`);
    this.addSql(`alter table \`job\` add column \`after_kinds\` text not null default '';`);
    this.addSql(`alter table \`job\` add column \`cancel_requested\` integer not null default false;`);
    this.addSql(`update \`job\` set \`subject_id\` = coalesce(\`file_id\`, 0), \`dedupe_key\` = 'file:' || coalesce(\`file_id\`, 0);`);
    this.addSql(`update \`job\` set \`after_kinds\` = ',inspect-table,' where \`kind\` = 'ingest-table';`);
    this.addSql(`update \`job\` set \`payload\` = json_remove(json_set(\`payload\`, '$.sourceKey', (select \`storage_key\` from \`dataset_file\` f where f.\`id\` = \`job\`.\`file_id\`)), '$.source', '$.output', '$.thumbnail', '$.trace', '$.parts') where \`state\` in ('queued', 'running') and \`file_id\` is not null;`);
    this.addSql(`create index \`job_subject_type_subject_id_index\` on \`job\` (\`subject_type\`, \`subject_id\`);`);
    this.addSql(`create index \`job_kind_dedupe_key_index\` on \`job\` (\`kind\`, \`dedupe_key\`);`);
  }

}

import { Migration } from '@mikro-orm/migrations';

/** Quality reports of localization tables, one per file. */
export class Migration20261204143704 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`quality_report\` (\`id\` integer not null primary key autoincrement, \`file_id\` integer not null, \`findings\` json not null, \`inputs\` json not null, \`computed_at\` datetime not null, constraint \`quality_report_file_id_foreign\` foreign key(\`file_id\`) references \`dataset_file\`(\`id\`) on delete cascade on update cascade);`);
    this.addSql(`create index \`quality_report_file_id_index\` on \`quality_report\` (\`file_id\`);`);
    this.addSql(`create unique index \`quality_report_file_id_unique\` on \`quality_report\` (\`file_id\`);`);
  }

}

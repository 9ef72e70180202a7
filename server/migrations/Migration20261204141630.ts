import { Migration } from '@mikro-orm/migrations';

export class Migration20261204141630 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table \`dataset_file\` add column \`derived_bytes\` bigint not null default 0;`);
  }

}

import { Migration } from '@mikro-orm/migrations';

/** Job priority: background work (the demo tables) runs after what people upload. */
export class Migration20261204151610 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`drop index \`job_state_id_index\`;`);

    this.addSql(`alter table \`job\` add column \`priority\` integer not null default 0;`);
    this.addSql(`create index \`job_state_priority_id_index\` on \`job\` (\`state\`, \`priority\`, \`id\`);`);
  }

}

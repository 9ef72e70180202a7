import { Migration } from '@mikro-orm/migrations';

export class Migration20261201233454 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`job\` (\`id\` integer not null primary key autoincrement, \`kind\` text not null, \`payload\` json not null, \`state\` text not null default 'queued', \`progress\` real not null default 0, \`message\` text null, \`error\` text null, \`attempts\` integer not null default 0, \`file_id\` integer null, \`created_at\` datetime not null, \`started_at\` datetime null, \`heartbeat_at\` datetime null, \`finished_at\` datetime null, constraint \`job_file_id_foreign\` foreign key(\`file_id\`) references \`dataset_file\`(\`id\`) on delete cascade on update cascade);`);
    this.addSql(`create index \`job_file_id_index\` on \`job\` (\`file_id\`);`);
    this.addSql(`create index \`job_state_id_index\` on \`job\` (\`state\`, \`id\`);`);

    this.addSql(`alter table \`dataset_file\` add column \`problem\` text null;`);
    this.addSql(`alter table \`dataset_file\` add column \`mapping\` json null;`);
    this.addSql(`alter table \`dataset_file\` add column \`report\` json null;`);
  }

}

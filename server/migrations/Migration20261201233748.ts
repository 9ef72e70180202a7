import { Migration } from '@mikro-orm/migrations';

export class Migration20261201233748 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`upload_reservation\` (\`upload_id\` text not null, \`project_id\` integer not null, \`dataset_id\` integer not null, \`user_id\` integer not null, \`file_name\` text not null, \`size\` bigint not null, \`created_at\` datetime not null, constraint \`upload_reservation_project_id_foreign\` foreign key(\`project_id\`) references \`project\`(\`id\`) on update cascade, constraint \`upload_reservation_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`upload_reservation_user_id_foreign\` foreign key(\`user_id\`) references \`user\`(\`id\`) on update cascade, primary key (\`upload_id\`));`);
    this.addSql(`create index \`upload_reservation_project_id_index\` on \`upload_reservation\` (\`project_id\`);`);
    this.addSql(`create index \`upload_reservation_dataset_id_index\` on \`upload_reservation\` (\`dataset_id\`);`);
    this.addSql(`create index \`upload_reservation_user_id_index\` on \`upload_reservation\` (\`user_id\`);`);
  }

}

import { Migration } from '@mikro-orm/migrations';

export class Migration20261201231929 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`instrument_profile\` (\`id\` integer not null primary key autoincrement, \`organization_id\` integer null, \`name\` text not null, \`instrument\` json not null, \`created_by_id\` integer null, \`created_at\` datetime not null, constraint \`instrument_profile_organization_id_foreign\` foreign key(\`organization_id\`) references \`organization\`(\`id\`) on delete set null on update cascade, constraint \`instrument_profile_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade);`);
    this.addSql(`create index \`instrument_profile_organization_id_index\` on \`instrument_profile\` (\`organization_id\`);`);
    this.addSql(`create index \`instrument_profile_created_by_id_index\` on \`instrument_profile\` (\`created_by_id\`);`);
    this.addSql(`create unique index \`instrument_profile_organization_id_name_unique\` on \`instrument_profile\` (\`organization_id\`, \`name\`);`);

    this.addSql(`create table \`dataset_metadata\` (\`dataset_id\` integer not null, \`document\` json not null, \`updated_by_id\` integer null, \`updated_at\` datetime not null, constraint \`dataset_metadata_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`dataset_metadata_updated_by_id_foreign\` foreign key(\`updated_by_id\`) references \`user\`(\`id\`) on delete set null on update cascade, primary key (\`dataset_id\`));`);
    this.addSql(`create index \`dataset_metadata_dataset_id_index\` on \`dataset_metadata\` (\`dataset_id\`);`);
    this.addSql(`create index \`dataset_metadata_updated_by_id_index\` on \`dataset_metadata\` (\`updated_by_id\`);`);
  }

}

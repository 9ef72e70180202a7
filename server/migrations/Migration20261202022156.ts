import { Migration } from '@mikro-orm/migrations';

export class Migration20261202022156 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table \`oidc_payload\` (\`model\` text not null, \`id\` text not null, \`payload\` json not null, \`grant_id\` text null, \`uid\` text null, \`user_code\` text null, \`expires_at\` datetime null, primary key (\`model\`, \`id\`));`);
    this.addSql(`create index \`oidc_payload_grant_id_index\` on \`oidc_payload\` (\`grant_id\`);`);
    this.addSql(`create index \`oidc_payload_uid_index\` on \`oidc_payload\` (\`uid\`);`);
    this.addSql(`create index \`oidc_payload_user_code_index\` on \`oidc_payload\` (\`user_code\`);`);
    this.addSql(`create index \`oidc_payload_expires_at_index\` on \`oidc_payload\` (\`expires_at\`);`);
  }

}

import { Migration } from '@mikro-orm/migrations';

/** The columns the dataset list searches, in the full-text index's column order. */
const SEARCHED = ['title', 'description', 'accession'];
const values = (row: 'new' | 'old') => SEARCHED.map((c) => `${row}.\`${c}\``).join(', ');
const columns = SEARCHED.map((c) => `\`${c}\``).join(', ');

/**
 * The dataset list under load: one index per sort that also carries the visibility columns
 * (state, project), replacing the single-column sort indexes; and the full-text index the list
 * searches instead of LIKE '%…%'. `dataset_fts` is an FTS5 table over the dataset table's own
 * text (external content: nothing is stored twice), kept in step by triggers in the same
 * transaction as each change. It splits words at anything but letters and digits, folds case
 * and accents, and keeps 2- and 3-letter prefix indexes for search-as-you-type.
 */
export class Migration20261204193454 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`drop index \`dataset_title_index\`;`);
    this.addSql(`drop index \`dataset_updated_at_index\`;`);
    this.addSql(`drop index \`dataset_created_at_index\`;`);

    this.addSql(`create index \`dataset_list_created_at_index\` on \`dataset\` (\`created_at\`, \`id\`, \`state\`, \`project_id\`);`);
    this.addSql(`create index \`dataset_list_updated_at_index\` on \`dataset\` (\`updated_at\`, \`id\`, \`state\`, \`project_id\`);`);
    this.addSql(`create index \`dataset_list_title_index\` on \`dataset\` (\`title\`, \`id\`, \`state\`, \`project_id\`);`);
    this.addSql(`create index \`dataset_list_accession_index\` on \`dataset\` (\`accession\`, \`id\`, \`state\`, \`project_id\`);`);
    this.addSql(`create index \`dataset_list_state_index\` on \`dataset\` (\`state\`, \`id\`, \`project_id\`);`);

    this.addSql(
      `create virtual table \`dataset_fts\` using fts5(${SEARCHED.join(', ')}, content='dataset', content_rowid='id', tokenize='unicode61 remove_diacritics 2', prefix='2 3');`,
    );
    this.addSql(
      `create trigger \`dataset_fts_insert\` after insert on \`dataset\` begin insert into \`dataset_fts\` (rowid, ${columns}) values (new.\`id\`, ${values('new')}); end;`,
    );
    this.addSql(
      `create trigger \`dataset_fts_delete\` after delete on \`dataset\` begin insert into \`dataset_fts\` (\`dataset_fts\`, rowid, ${columns}) values ('delete', old.\`id\`, ${values('old')}); end;`,
    );
    // Only a change of searched text touches the index; state and date changes do not.
    this.addSql(
      `create trigger \`dataset_fts_update\` after update of ${columns} on \`dataset\` begin insert into \`dataset_fts\` (\`dataset_fts\`, rowid, ${columns}) values ('delete', old.\`id\`, ${values('old')}); insert into \`dataset_fts\` (rowid, ${columns}) values (new.\`id\`, ${values('new')}); end;`,
    );
    this.addSql(`insert into \`dataset_fts\` (\`dataset_fts\`) values ('rebuild');`);
  }

  override async down(): Promise<void> {
    for (const event of ['insert', 'delete', 'update']) this.addSql(`drop trigger if exists \`dataset_fts_${event}\`;`);
    this.addSql(`drop table if exists \`dataset_fts\`;`);
    for (const name of ['created_at', 'updated_at', 'title', 'accession', 'state']) this.addSql(`drop index \`dataset_list_${name}_index\`;`);
    this.addSql(`create index \`dataset_created_at_index\` on \`dataset\` (\`created_at\`);`);
    this.addSql(`create index \`dataset_updated_at_index\` on \`dataset\` (\`updated_at\`);`);
    this.addSql(`create index \`dataset_title_index\` on \`dataset\` (\`title\`);`);
  }

}

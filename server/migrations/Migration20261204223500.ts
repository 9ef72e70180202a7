import { Migration } from '@mikro-orm/migrations';

/**
 * The metadata terms a public search looks in, one text per dataset: structure imaged, organism,
 * cell type and line, each label's target, fluorophore and probe class, technique, illumination,
 * buffer, instrument models and keywords (paths of shared/metadata).
 */
const TERMS = `trim(concat_ws(' ',
  json_extract(m.document, '$.biosample.structure'),
  json_extract(m.document, '$.biosample.organism.name'),
  json_extract(m.document, '$.biosample.cellType'),
  json_extract(m.document, '$.biosample.cellLine'),
  (select group_concat(concat_ws(' ', json_extract(l.value, '$.target'), json_extract(l.value, '$.label'), json_extract(l.value, '$.probeClass'), json_extract(l.value, '$.strategy')), ' ') from json_each(m.document, '$.labelling') l),
  json_extract(m.document, '$.acquisition.technique'),
  json_extract(m.document, '$.acquisition.illumination'),
  json_extract(m.document, '$.acquisition.imagingBuffer'),
  json_extract(m.document, '$.instrument.microscopeModel'),
  json_extract(m.document, '$.instrument.objective.model'),
  json_extract(m.document, '$.instrument.detector.model'),
  (select group_concat(k.value, ' ') from json_each(m.document, '$.study.keywords') k)
))`;

const COLUMNS = '`title`, `description`, `accession`, `terms`';
/** Re-indexes one dataset from the view (nothing when the dataset is gone). */
const reindex = (id: string) =>
  `delete from \`dataset_fts\` where rowid = ${id}; insert into \`dataset_fts\` (rowid, ${COLUMNS}) select \`id\`, ${COLUMNS} from \`dataset_search_text\` where \`id\` = ${id};`;

/**
 * The full-text index of the dataset list grows a fourth column, `terms`, from the metadata
 * document, so one MATCH finds titles, descriptions, accessions and metadata alike (the list and
 * the public search share it). Its text no longer lives in one table, so the index becomes
 * contentless with deletes by rowid (SQLite ≥ 3.43) over the view `dataset_search_text`, and
 * triggers on both tables re-index a dataset in the same transaction as each change.
 */
export class Migration20261204223500 extends Migration {

  override async up(): Promise<void> {
    for (const event of ['insert', 'delete', 'update']) this.addSql(`drop trigger if exists \`dataset_fts_${event}\`;`);
    this.addSql(`drop table if exists \`dataset_fts\`;`);
    this.addSql(
      `create view \`dataset_search_text\` as select d.\`id\`, d.\`title\`, d.\`description\`, d.\`accession\`, coalesce(${TERMS}, '') as \`terms\` from \`dataset\` d left join \`dataset_metadata\` m on m.\`dataset_id\` = d.\`id\`;`,
    );
    this.addSql(
      `create virtual table \`dataset_fts\` using fts5(title, description, accession, terms, content='', contentless_delete=1, tokenize='unicode61 remove_diacritics 2', prefix='2 3');`,
    );
    this.addSql(`create trigger \`dataset_fts_insert\` after insert on \`dataset\` begin ${reindex('new.`id`')} end;`);
    this.addSql(`create trigger \`dataset_fts_delete\` after delete on \`dataset\` begin delete from \`dataset_fts\` where rowid = old.\`id\`; end;`);
    // Only a change of searched text touches the index; state and date changes do not.
    this.addSql(
      `create trigger \`dataset_fts_update\` after update of \`title\`, \`description\`, \`accession\` on \`dataset\` begin ${reindex('new.`id`')} end;`,
    );
    this.addSql(`create trigger \`dataset_fts_metadata_insert\` after insert on \`dataset_metadata\` begin ${reindex('new.`dataset_id`')} end;`);
    this.addSql(`create trigger \`dataset_fts_metadata_update\` after update of \`document\` on \`dataset_metadata\` begin ${reindex('new.`dataset_id`')} end;`);
    this.addSql(`create trigger \`dataset_fts_metadata_delete\` after delete on \`dataset_metadata\` begin ${reindex('old.`dataset_id`')} end;`);
    this.addSql(`insert into \`dataset_fts\` (rowid, ${COLUMNS}) select \`id\`, ${COLUMNS} from \`dataset_search_text\`;`);
  }

  override async down(): Promise<void> {
    for (const event of ['insert', 'delete', 'update', 'metadata_insert', 'metadata_update', 'metadata_delete'])
      this.addSql(`drop trigger if exists \`dataset_fts_${event}\`;`);
    this.addSql(`drop table if exists \`dataset_fts\`;`);
    this.addSql(`drop view if exists \`dataset_search_text\`;`);
    const searched = '`title`, `description`, `accession`';
    const values = (row: string) => ['title', 'description', 'accession'].map((c) => `${row}.\`${c}\``).join(', ');
    this.addSql(`create virtual table \`dataset_fts\` using fts5(title, description, accession, content='dataset', content_rowid='id', tokenize='unicode61 remove_diacritics 2', prefix='2 3');`);
    this.addSql(`create trigger \`dataset_fts_insert\` after insert on \`dataset\` begin insert into \`dataset_fts\` (rowid, ${searched}) values (new.\`id\`, ${values('new')}); end;`);
    this.addSql(`create trigger \`dataset_fts_delete\` after delete on \`dataset\` begin insert into \`dataset_fts\` (\`dataset_fts\`, rowid, ${searched}) values ('delete', old.\`id\`, ${values('old')}); end;`);
    this.addSql(`create trigger \`dataset_fts_update\` after update of ${searched} on \`dataset\` begin insert into \`dataset_fts\` (\`dataset_fts\`, rowid, ${searched}) values ('delete', old.\`id\`, ${values('old')}); insert into \`dataset_fts\` (rowid, ${searched}) values (new.\`id\`, ${values('new')}); end;`);
    this.addSql(`insert into \`dataset_fts\` (\`dataset_fts\`) values ('rebuild');`);
  }

}

import { Migration } from '@mikro-orm/migrations'

/**
 * The metadata terms a search looks in, as SQLite's `dataset_search_text` view reads them
 * (migration 20261204223500): structure, organism, cell type and line, each label's target,
 * fluorophore, probe class and strategy, technique, illumination, buffer, instrument models and
 * keywords.
 */
const TERMS = `concat_ws(' ',
  m.document #>> '{biosample,structure}',
  m.document #>> '{biosample,organism,name}',
  m.document #>> '{biosample,cellType}',
  m.document #>> '{biosample,cellLine}',
  (select string_agg(concat_ws(' ', l.value ->> 'target', l.value ->> 'label', l.value ->> 'probeClass', l.value ->> 'strategy'), ' ') from jsonb_array_elements(m.document -> 'labelling') l),
  m.document #>> '{acquisition,technique}',
  m.document #>> '{acquisition,illumination}',
  m.document #>> '{acquisition,imagingBuffer}',
  m.document #>> '{instrument,microscopeModel}',
  m.document #>> '{instrument,objective,model}',
  m.document #>> '{instrument,detector,model}',
  (select string_agg(k.value, ' ') from jsonb_array_elements_text(m.document #> '{study,keywords}') k))`

/**
 * The full-text index of the dataset list and the public search on PostgreSQL, the counterpart
 * of SQLite's FTS5 table `dataset_fts`: one tsvector per dataset over its title, description,
 * accession and metadata terms, in the `simple` configuration (no stemming, as FTS5's unicode61)
 * with accents removed (`unaccent`, as remove_diacritics) and punctuation read as a space (as
 * unicode61 splits; PostgreSQL's own parser would read "STPL-000001" as "stpl" and the number
 * -000001), under a GIN index. Triggers refresh a
 * dataset's row in the same transaction as each change of its text or its metadata. The table is
 * not an entity (the ORM's schema diff skips it).
 */
export class Migration20261205030000 extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create extension if not exists unaccent;`)
    this.addSql(
      `create table "dataset_search" ("dataset_id" int not null primary key references "dataset" ("id") on delete cascade, "document" tsvector not null);`,
    )
    this.addSql(
      `create index "dataset_search_document_index" on "dataset_search" using gin ("document");`,
    )
    this.addSql(
      `create function "refresh_dataset_search"(dataset int) returns void language sql as $$
        insert into "dataset_search" ("dataset_id", "document")
        select d.id, to_tsvector('simple', regexp_replace(unaccent(concat_ws(' ', d.title, d.description, d.accession, ${TERMS})), '[[:punct:]]+', ' ', 'g'))
        from "dataset" d left join "dataset_metadata" m on m.dataset_id = d.id where d.id = dataset
        on conflict ("dataset_id") do update set "document" = excluded."document";
      $$;`,
    )
    this.addSql(
      `create function "dataset_search_on_dataset"() returns trigger language plpgsql as $$ begin perform "refresh_dataset_search"(new.id); return null; end $$;`,
    )
    this.addSql(
      `create function "dataset_search_on_metadata"() returns trigger language plpgsql as $$ begin perform "refresh_dataset_search"(coalesce(new.dataset_id, old.dataset_id)); return null; end $$;`,
    )
    // Only a change of searched text touches the index; state and date changes do not. A deleted
    // dataset's row goes with it (on delete cascade).
    this.addSql(
      `create trigger "dataset_search_insert" after insert or update of "title", "description", "accession" on "dataset" for each row execute function "dataset_search_on_dataset"();`,
    )
    this.addSql(
      `create trigger "dataset_search_metadata" after insert or update of "document" or delete on "dataset_metadata" for each row execute function "dataset_search_on_metadata"();`,
    )
    this.addSql(`select "refresh_dataset_search"(id) from "dataset";`)
  }

  override async down(): Promise<void> {
    this.addSql(`drop trigger if exists "dataset_search_metadata" on "dataset_metadata";`)
    this.addSql(`drop trigger if exists "dataset_search_insert" on "dataset";`)
    this.addSql(`drop function if exists "dataset_search_on_metadata"();`)
    this.addSql(`drop function if exists "dataset_search_on_dataset"();`)
    this.addSql(`drop function if exists "refresh_dataset_search"(int);`)
    this.addSql(`drop table if exists "dataset_search";`)
  }
}

import type { EntityManager } from '@mikro-orm/better-sqlite'
import { accessPhase } from '@shared/domain/dataset-state'
import type { PublicSearchPage, PublicSearchParams } from '@shared/schemas/public-search.schema'
import { databaseDriver } from '../../db'
import { searchMatch, TS_MATCH } from '../datasets/dataset-list-sql'
import { searchPage, type SearchRow } from './search-results'

/**
 * Every dataset the public search may list (approved: public or under embargo; drafts and
 * withdrawn ones never), with the metadata its facets read, one row each. It reads through the
 * (state, project) index, never the whole table; a search narrows it to the full-text matches.
 */
export const ROWS_SQL = `select d.id, d.accession, d.title, d.description, d.approved_at, d.embargo_until,
  json_extract(m.document, '$.acquisition.technique') as technique,
  json_extract(m.document, '$.biosample.structure') as structure,
  json_extract(m.document, '$.biosample.organism.name') as organism,
  (select json_group_array(distinct json_extract(l.value, '$.probeClass')) from json_each(m.document, '$.labelling') l where json_extract(l.value, '$.probeClass') is not null) as probe_classes,
  (select json_group_array(json_extract(a.value, '$.name')) from json_each(m.document, '$.study.authors') a where json_extract(a.value, '$.name') is not null) as authors,
  (select min(json_extract(q.findings, '$.frcResolutionNm')) from dataset_file f join quality_report q on q.file_id = f.id where f.dataset_id = d.id) as frc
  from dataset d left join dataset_metadata m on m.dataset_id = d.id
  where d.state = 'approved'`

/** The same rows on PostgreSQL (its JSON operators; arrays as JSON text, as SQLite gives them). */
export const ROWS_SQL_POSTGRESQL = `select d.id, d.accession, d.title, d.description, d.approved_at, d.embargo_until,
  m.document #>> '{acquisition,technique}' as technique,
  m.document #>> '{biosample,structure}' as structure,
  m.document #>> '{biosample,organism,name}' as organism,
  (select json_agg(distinct l.value ->> 'probeClass')::text from jsonb_array_elements(m.document -> 'labelling') l where l.value ->> 'probeClass' is not null) as probe_classes,
  (select json_agg(a.value ->> 'name' order by a.n)::text from jsonb_array_elements(m.document #> '{study,authors}') with ordinality a(value, n) where a.value ->> 'name' is not null) as authors,
  (select min((q.findings ->> 'frcResolutionNm')::float8) from dataset_file f join quality_report q on q.file_id = f.id where f.dataset_id = d.id) as frc
  from dataset d left join dataset_metadata m on m.dataset_id = d.id
  where d.state = 'approved'`

export const MATCHED = ' and d.id in (select rowid from dataset_fts where dataset_fts match ?)'
const RANKS =
  'select rowid as id, bm25(dataset_fts) as rank from dataset_fts where dataset_fts match ?'

/** Ranks as bm25 gives them, lower first: the negated cover density of the words. */
export const MATCHED_POSTGRESQL = ` and d.id in (select dataset_id from dataset_search where ${TS_MATCH})`
const RANKS_POSTGRESQL = `select dataset_id as id, -ts_rank_cd(document, to_tsquery('simple', unaccent(?))) as rank from dataset_search where ${TS_MATCH}`

interface RawRow {
  id: number
  accession: string
  title: string
  description: string
  approved_at: number | string | null
  embargo_until: number | string | null
  technique: string | null
  structure: string | null
  organism: string | null
  probe_classes: string | null
  authors: string | null
  frc: number | null
}

const dateOf = (v: number | string | null) => (v === null ? null : new Date(v))
const SUMMARY_CHARS = 240

function summaryOf(description: string): string {
  const text = description.replace(/\s+/g, ' ').trim()
  return text.length <= SUMMARY_CHARS ? text : `${text.slice(0, SUMMARY_CHARS - 1).trimEnd()}…`
}

/** A row as the public sees it: under embargo, no quality numbers (they come with the files). */
function toSearchRow(raw: RawRow, rank: number, now: Date): SearchRow {
  const approvedAt = dateOf(raw.approved_at)
  const embargoUntil = dateOf(raw.embargo_until)
  const released = accessPhase({ state: 'approved', embargoUntil }, now) === 'released'
  const available = !released && embargoUntil ? embargoUntil : approvedAt
  return {
    availableAt: available?.getTime() ?? 0,
    rank,
    item: {
      accession: raw.accession,
      title: raw.title,
      summary: summaryOf(raw.description),
      authors: raw.authors ? (JSON.parse(raw.authors) as string[]) : [],
      technique: raw.technique,
      structure: raw.structure,
      organism: raw.organism,
      probeClasses: raw.probe_classes ? (JSON.parse(raw.probe_classes) as string[]) : [],
      year: available ? available.getUTCFullYear() : null,
      frcResolutionNm: released && typeof raw.frc === 'number' ? raw.frc : null,
      embargoUntil: released || !embargoUntil ? null : embargoUntil.toISOString().slice(0, 10),
    },
  }
}

const EMPTY_PAGE: PublicSearchPage = {
  items: [],
  total: 0,
  facets: { technique: [], structure: [], organism: [], probeClass: [], frcRange: [], year: [] },
}

/**
 * The public search: approved datasets whose title, description, accession or metadata terms
 * hold every word typed (dataset_fts), narrowed by facets, sorted, one page. Words that hold
 * nothing worth looking for (only stop words or punctuation such as `%` or `_`) give an empty
 * page, never the whole catalogue.
 */
export async function publicSearch(
  em: EntityManager,
  q: PublicSearchParams,
  now: Date,
): Promise<PublicSearchPage> {
  const dialect = databaseDriver(em)
  const match = q.q ? searchMatch(q.q, dialect) : undefined
  if (match === null) return EMPTY_PAGE
  const sqlite = dialect === 'sqlite'
  const rowsSql = sqlite ? ROWS_SQL : ROWS_SQL_POSTGRESQL
  const connection = em.getConnection()
  const [raws, ranks] = await Promise.all([
    connection.execute<RawRow[]>(
      match ? rowsSql + (sqlite ? MATCHED : MATCHED_POSTGRESQL) : rowsSql,
      match ? [match] : [],
    ),
    match
      ? connection.execute<{ id: number; rank: number }[]>(
          sqlite ? RANKS : RANKS_POSTGRESQL,
          sqlite ? [match] : [match, match],
        )
      : Promise.resolve([]),
  ])
  const rankOf = new Map(ranks.map((r) => [r.id, r.rank]))
  const rows = raws.map((raw) => toSearchRow(raw, rankOf.get(raw.id) ?? 0, now))
  return searchPage(rows, q)
}

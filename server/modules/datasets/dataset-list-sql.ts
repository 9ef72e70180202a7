import type { DatasetState } from '@shared/domain/dataset-state'
import type { DatasetSortField } from '@shared/schemas/dataset.schema'
import type { ListPosition } from './dataset-cursor'
import { searchExpression, searchTsQuery } from './dataset-search'

/**
 * The SQL of the dataset list, as plain text and positional parameters (no ORM on this path: the
 * same statements run prepared on the list's own connection, or through the ORM in tests). Each
 * sort has an index of its column, id, and the visibility columns (see dataset.entity.ts), and a
 * page is read in one of two plans:
 *
 * - walk: the sort's index in order, checking each entry against the filters inside the index,
 *   until the page is full. Cheap when the filters keep a fair share of the rows; deep pages
 *   start from a cursor's position, or come from the whole result the catalogue keeps.
 * - gather: the few rows the filters select through their own index (project, state) or the
 *   full-text index, then sorted. Chosen only while the total is small (see the catalogue), so
 *   the sort is of a bounded number of rows.
 */

/**
 * Which SQL the list speaks: SQLite's (with its index hints and the FTS5 search), or PostgreSQL's
 * (the same statements without SQLite's hints, searching its own full-text index).
 */
export type ListDialect = 'sqlite' | 'postgresql'

interface SortColumn {
  column: string
  index: string
  valueType: 'number' | 'string'
}

export const SORT_COLUMNS: Record<DatasetSortField, SortColumn> = {
  createdAt: { column: 'created_at', index: 'dataset_list_created_at_index', valueType: 'number' },
  updatedAt: { column: 'updated_at', index: 'dataset_list_updated_at_index', valueType: 'number' },
  title: { column: 'title', index: 'dataset_list_title_index', valueType: 'string' },
  accession: { column: 'accession', index: 'dataset_list_accession_index', valueType: 'string' },
  state: { column: 'state', index: 'dataset_list_state_index', valueType: 'string' },
}

/** What narrows the list: the viewer's visibility (SQL over `d`, '' when they see every row) and filters. */
export interface ListFilter {
  visibility: string
  projectId?: number
  state?: DatasetState
  /** The dialect's full-text query (see searchMatch). */
  match?: string
}

export interface ListOrder {
  field: DatasetSortField
  descending: boolean
}

export type ListPlan = 'walk' | 'gather'

export interface Sql {
  sql: string
  params: unknown[]
}

/** Every dataset a search matches, whoever may see it. */
export const FTS_ROWIDS = 'select rowid from `dataset_fts` where `dataset_fts` match ?'

/** The match on PostgreSQL's full-text index (`dataset_search`, a tsquery text as parameter). */
export const TS_MATCH = `"document" @@ to_tsquery('simple', unaccent(?))`

/** Every dataset a search matches, in the dialect's full-text index. */
export const ftsRowidsSql = (dialect: ListDialect): string =>
  dialect === 'sqlite' ? FTS_ROWIDS : `select "dataset_id" from "dataset_search" where ${TS_MATCH}`

/** What someone typed as the dialect's full-text query (see dataset-search.ts). */
export const searchMatch = (text: string, dialect: ListDialect): string | null =>
  dialect === 'sqlite' ? searchExpression(text) : searchTsQuery(text)

/**
 * The filter's conditions. In a gather (and a count) the search is the FROM's full-text index and
 * the visibility may drive an index; in a walk the search is a membership test, and the
 * visibility a plain test of each entry (unary +): used to pick rows through an index (an IN list
 * of states or ids), it would undo the sort's order.
 */
function conditions(
  filter: ListFilter,
  params: unknown[],
  plan: ListPlan,
  dialect: ListDialect,
): string[] {
  const out: string[] = []
  if (plan === 'gather' && filter.match !== undefined) {
    out.push(
      dialect === 'sqlite'
        ? 'f."dataset_fts" match ?'
        : `d."id" = any(array(${ftsRowidsSql(dialect)}))`,
    )
    params.push(filter.match)
  }
  // Unary + is SQLite's way of keeping a column from driving the plan; PostgreSQL needs none.
  if (filter.visibility)
    out.push(
      plan === 'walk' && dialect === 'sqlite'
        ? `+(${filter.visibility})`
        : `(${filter.visibility})`,
    )
  if (filter.projectId !== undefined) {
    out.push('d."project_id" = ?')
    params.push(filter.projectId)
  }
  if (filter.state !== undefined) {
    out.push('d."state" = ?')
    params.push(filter.state)
  }
  if (plan === 'walk' && filter.match !== undefined) {
    out.push(`d."id" in (${ftsRowidsSql(dialect)})`)
    params.push(filter.match)
  }
  return out
}

/**
 * The search drives a gather from the full-text index; the table follows by primary key. On
 * PostgreSQL the matches are an array the primary key is probed with: as a join, the planner
 * (which estimates any prefix search at a fixed share of the table) would hash it against the
 * whole table even for a handful of matches. (A search matching more than GATHER_MAX_ROWS
 * datasets is read from the list and its match set, see the catalogue.)
 */
const gatherFrom = (filter: ListFilter, dialect: ListDialect) =>
  filter.match !== undefined && dialect === 'sqlite'
    ? 'from "dataset_fts" f cross join "dataset" d on d."id" = f.rowid'
    : 'from "dataset" d'

const whereOf = (parts: string[]) => (parts.length ? ` where ${parts.join(' and ')}` : '')

/** How many rows the filter selects. */
export function countSql(filter: ListFilter, dialect: ListDialect = 'sqlite'): Sql {
  const params: unknown[] = []
  const parts = conditions(filter, params, 'gather', dialect)
  return { sql: `select count(*) ${gatherFrom(filter, dialect)}${whereOf(parts)}`, params }
}

export interface PageWindow {
  /** Rows to return, -1 for all (the catalogue asks one more than a page: do more follow?). */
  limit: number
  offset: number
  /** Continue after (or from, when inclusive) this position in the sort. */
  from?: { at: ListPosition; inclusive: boolean }
}

/** The ids of one page in order (limit -1: the whole result). */
export function pageIdsSql(
  filter: ListFilter,
  order: ListOrder,
  plan: ListPlan,
  window: PageWindow,
  dialect: ListDialect = 'sqlite',
): Sql {
  const { column, index, valueType } = SORT_COLUMNS[order.field]
  const sqlite = dialect === 'sqlite'
  const params: unknown[] = []
  const gather = plan === 'gather'
  const parts = conditions(filter, params, plan, dialect)
  if (window.from) {
    const op = (order.descending ? '<' : '>') + (window.from.inclusive ? '=' : '')
    // A date's position is epoch milliseconds: SQLite stores dates so, PostgreSQL as timestamps.
    const value = !sqlite && valueType === 'number' ? 'to_timestamp(? / 1000.0)' : '?'
    parts.push(`(d."${column}", d."id") ${op} (${value}, ?)`)
    params.push(window.from.at.value, window.from.at.id)
  }
  const direction = order.descending ? 'desc' : 'asc'
  // Unary + keeps a gather from walking the sort's index instead of using the filter's own.
  const sorted = gather && sqlite ? `+d."${column}"` : `d."${column}"`
  // SQLite is told which index to walk; PostgreSQL's planner finds it from the order and limit.
  const from = gather
    ? gatherFrom(filter, dialect)
    : `from "dataset" d${sqlite ? ` indexed by "${index}"` : ''}`
  // No limit: -1 on SQLite, null on PostgreSQL.
  params.push(window.limit === -1 && !sqlite ? null : window.limit, window.offset)
  return {
    sql:
      `select d."id" ${from}${whereOf(parts)} ` +
      `order by ${sorted} ${direction}, d."id" ${direction} limit ? offset ?`,
    params,
  }
}

import type { DatasetSortField, DatasetSummaryDto } from '@shared/schemas/dataset.schema'
import { SORT_COLUMNS, type ListDialect } from './dataset-list-sql'

const PAGE_COLUMNS =
  'select d."id", d."accession", d."title", d."project_id", p."name" as project_name, ' +
  'd."state", d."embargo_until", d."proposed_embargo_until", d."licence", d."version", ' +
  'd."created_by_id", u."name" as creator_name, d."created_at", d."updated_at", d."submitted_at", d."approved_at" '
const PAGE_JOINS =
  'join "project" p on p."id" = d."project_id" left join "user" u on u."id" = d."created_by_id"'

/**
 * The rows of one page by id (a JSON array of ids), with the project's and the creator's names,
 * read as arrays in the order of PageRow (the driver builds arrays several times faster than
 * objects). Every column has its own name, so rows read as objects keep them all.
 */
export const PAGE_ROWS_SQL = `${PAGE_COLUMNS}from json_each(?) j cross join "dataset" d on d."id" = j.value ${PAGE_JOINS}`

/**
 * The same on PostgreSQL, from the same JSON array of ids made an array literal: a constant the
 * planner counts, so it probes the primary key (from a set-returning function it guessed 100 rows
 * and could hash the whole table for them).
 */
const PAGE_ROWS_POSTGRESQL = `${PAGE_COLUMNS}from "dataset" d ${PAGE_JOINS} where d."id" = any(translate(?, '[]', '{}')::int[])`

export const pageRowsSql = (dialect: ListDialect) =>
  dialect === 'sqlite' ? PAGE_ROWS_SQL : PAGE_ROWS_POSTGRESQL

/** Epoch milliseconds on SQLite (how the ORM stores dates there), timestamp text on PostgreSQL. */
type Moment = number | string | Date | null
export type PageRow = [
  id: number,
  accession: string,
  title: string,
  projectId: number,
  projectName: string,
  state: DatasetSummaryDto['state'],
  embargoUntil: Moment,
  proposedEmbargoUntil: Moment,
  licence: string,
  version: number,
  createdById: number | null,
  creatorName: string | null,
  createdAt: Moment,
  updatedAt: Moment,
  submittedAt: Moment,
  approvedAt: Moment,
]

const iso = (t: Moment) => (t === null ? null : new Date(t).toISOString())
const day = (t: Moment) => (t === null ? null : new Date(t).toISOString().slice(0, 10))

export function pageRowDto(r: PageRow): DatasetSummaryDto {
  return {
    id: r[0],
    accession: r[1],
    title: r[2],
    project: { id: r[3], name: r[4] },
    state: r[5],
    embargoUntil: day(r[6]),
    proposedEmbargoUntil: day(r[7]),
    licence: r[8],
    version: r[9],
    createdBy: r[10] === null ? null : { id: r[10], name: r[11] ?? '' },
    createdAt: iso(r[12])!,
    updatedAt: iso(r[13])!,
    submittedAt: iso(r[14]),
    approvedAt: iso(r[15]),
  }
}

/** Where a row's sort value sits in PageRow, for the cursor after it. */
const SORT_VALUE_AT: Record<DatasetSortField, number> = {
  createdAt: 12,
  updatedAt: 13,
  title: 2,
  accession: 1,
  state: 5,
}

/** A dataset as the list sends it (JSON, UTF-8, encoded once) and its row (for a cursor). */
export interface RenderedRow {
  json: Buffer
  row: PageRow
}

/** The row's sort value as a cursor carries it (dates as epoch milliseconds, as SQLite stores them). */
export const sortValueOf = (rendered: RenderedRow, field: DatasetSortField): number | string => {
  const value = rendered.row[SORT_VALUE_AT[field]] as Exclude<Moment, null>
  if (SORT_COLUMNS[field].valueType === 'number' && typeof value !== 'number')
    return new Date(value).getTime()
  return value as number | string
}

/**
 * Listed datasets, encoded, kept for one access version: pages at random depths share most of
 * their rows, and reading and encoding 50 rows costs more than finding which 50 they are. A newer
 * version empties the cache; a request that began before it reads but does not store.
 */
export class RenderedRows {
  private version = -1
  private readonly rows = new Map<number, RenderedRow>()

  private readonly sql: string

  constructor(
    private readonly capacity: number,
    dialect: ListDialect = 'sqlite',
  ) {
    this.sql = pageRowsSql(dialect)
  }

  /** The rows of these ids in their order (a row deleted meanwhile is left out). */
  async get(
    ids: readonly number[],
    version: number,
    read: (sql: string, params: unknown[]) => Promise<PageRow[]>,
  ): Promise<RenderedRow[]> {
    if (version > this.version || this.rows.size > this.capacity) {
      this.rows.clear()
      this.version = version
    }
    const current = version === this.version
    const found = ids.map((id) => (current ? this.rows.get(id) : undefined))
    const missing = ids.filter((_, i) => found[i] === undefined)
    if (missing.length) {
      for (const row of await read(this.sql, [JSON.stringify(missing)])) {
        const rendered = { json: Buffer.from(JSON.stringify(pageRowDto(row))), row }
        if (current && version === this.version) this.rows.set(row[0], rendered)
        found[ids.indexOf(row[0])] = rendered
      }
    }
    return found.filter((r): r is RenderedRow => r !== undefined)
  }
}

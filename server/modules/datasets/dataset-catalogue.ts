import type { EntityManager, FilterQuery, ObjectQuery } from '@mikro-orm/better-sqlite'
import type { DatasetSortField, ListDatasetsParams } from '@shared/schemas/dataset.schema'
import { accessibleWhere } from '../../http/access'
import { VersionedCache } from '../../http/versioned-cache'
import type { Actor } from '../../services'
import { readAccessVersion } from '../common/access-version'
import { decodeCursor, encodeCursor, type ListPosition } from './dataset-cursor'
import { Dataset, type IDataset } from './dataset.entity'
import { RenderedRows, sortValueOf, type PageRow, type RenderedRow } from './dataset-list-rows'
import type { ListReader } from './dataset-list-reader'
import {
  SORT_COLUMNS,
  ftsRowidsSql,
  searchMatch,
  countSql,
  pageIdsSql,
  type ListFilter,
  type ListOrder,
  type ListPlan,
  type Sql,
} from './dataset-list-sql'
import { ResultCache } from './result-cache'

/** A gather (filter first, then sort) is chosen only up to this many matching rows. */
export const GATHER_MAX_ROWS = 2000
/** From this offset on (and for every search) pages are sliced from the whole result. */
export const WHOLE_RESULT_FROM = 200

/** One page as the API sends it, encoded once. */
export interface ListAnswer {
  body: Buffer
  /** Milliseconds spent in the database; null when the page came from the cache. */
  dbMs: number | null
}

/** What someone may read, as CASL gives it, with its cache key. */
interface Viewing {
  allowed: FilterQuery<IDataset>
  key: string
}

/** The datasets a search matches, as flags by id. */
interface MatchSet {
  count: number
  has: Uint8Array
}

/** Database time of one request. */
interface Clock {
  ms: number
}

interface ListRequest {
  viewing: Viewing
  match: string | undefined
  /** The filter without the search. */
  baseKey: string
  filterKey: string
  pageKey: string
}

const emptyBody = (total: number) =>
  Buffer.from(JSON.stringify({ items: [], total, nextCursor: null }))
const NOTHING = emptyBody(0)

const ITEMS_START = Buffer.from('{"items":[')
const COMMA = 0x2c

/** The page's JSON from its rows' encoded bytes, copied once into one buffer. */
function pageBody(rows: RenderedRow[], total: number, nextCursor: string | null): Buffer {
  const end = Buffer.from(`],"total":${total},"nextCursor":${JSON.stringify(nextCursor)}}`)
  let size = ITEMS_START.length + Math.max(rows.length - 1, 0) + end.length
  for (const r of rows) size += r.json.length
  // Sized and filled here rather than by Buffer.concat: half the pieces (no comma buffers) and
  // no per-piece checks, on the busiest route.
  const body = Buffer.allocUnsafe(size)
  body.set(ITEMS_START, 0)
  let at = ITEMS_START.length
  for (let i = 0; i < rows.length; i++) {
    if (i) body[at++] = COMMA
    body.set(rows[i]!.json, at)
    at += rows[i]!.json.length
  }
  body.set(end, at)
  return body
}

/**
 * The viewer's visibility as SQL over `d`, written by MikroORM from the CASL rules (values
 * inlined and escaped by the ORM), once per set of rules; '' when every row is visible.
 */
export function visibilitySql(em: EntityManager, allowed: FilterQuery<IDataset>): string {
  // Quoted as the database quotes identifiers (backticks on SQLite, double quotes on PostgreSQL).
  const q = (id: string) => em.getPlatform().quoteIdentifier(id)
  const prefix = `select ${q('d')}.${q('id')} from ${q('dataset')} as ${q('d')}`
  const sql = em
    .createQueryBuilder(Dataset, 'd')
    .select('d.id')
    .where(structuredClone(allowed) as ObjectQuery<IDataset>)
    .getFormattedQuery()
  if (!sql.startsWith(prefix)) throw new Error(`Unexpected visibility query: ${sql}`)
  const rest = sql.slice(prefix.length)
  return rest.startsWith(' where ') ? rest.slice(' where '.length) : ''
}

/**
 * The dataset list behind GET /api/datasets: narrowed in SQL by the caller's abilities, sorted
 * and paged over the indexes of dataset-list-sql.ts, searched through the full-text index.
 * Totals, whole results (ids in order), encoded rows and pages are kept per access version:
 * exact, not a time-to-live, as any change to datasets, projects, shares, memberships or users
 * raises the version in the same transaction and the next request reads afresh. So a page costs
 * at most one short index walk and a read of the rows not yet encoded, however deep it is.
 */
export class DatasetCatalogue {
  private readonly totals = new VersionedCache<number>(2000)
  private readonly pages = new VersionedCache<Buffer>(500)
  /** Whole results in order, as ids: a page at any depth is a slice. 8 M ids: 32 MB at most. */
  private readonly results = new ResultCache(8_000_000)
  /**
   * Encoded rows of the current version, ≈1 kB each (≈60 MB at most). At 20 000 the mixed load
   * over 100 000 datasets kept clearing it: p95 71 ms; at 60 000, 35 ms (bench, same machine).
   */
  private readonly rendered: RenderedRows
  /** What each search matches, whoever may see it: one byte per dataset id. */
  private readonly matches = new VersionedCache<MatchSet>(50)
  /** Per abilities object (each is reused for a second): what it may read. */
  private readonly viewings = new WeakMap<object, Viewing | null>()
  private readonly visibility = new Map<string, string>()

  constructor(private readonly reader: ListReader) {
    this.rendered = new RenderedRows(60_000, reader.dialect)
  }

  /** A page from the cache, without waiting for anything; undefined when it must be read. */
  cached(actor: Actor, q: ListDatasetsParams): Buffer | undefined {
    const request = this.requestOf(actor, q)
    if (request === null) return NOTHING
    if (actor.accessVersion === undefined) return undefined
    return this.pages.get(request.pageKey, actor.accessVersion)
  }

  /** `em` is asked for only when the database must be read through the ORM. */
  async list(em: () => EntityManager, actor: Actor, q: ListDatasetsParams): Promise<ListAnswer> {
    const request = this.requestOf(actor, q)
    if (request === null) return { body: NOTHING, dbMs: 0 }
    const version = actor.accessVersion ?? (await readAccessVersion(em()))
    const cached = this.pages.get(request.pageKey, version)
    if (cached) return { body: cached, dbMs: null }
    const clock = { ms: 0 }
    const body = await this.read(em, clock, request, version, q)
    // First pages are asked for again and again; deep ones are cheap to slice again.
    if (q.offset < WHOLE_RESULT_FROM && !q.cursor) this.pages.set(request.pageKey, version, body)
    return { body, dbMs: clock.ms }
  }

  /** null: the caller sees nothing, or searched for nothing worth looking for. */
  private requestOf(actor: Actor, q: ListDatasetsParams): ListRequest | null {
    const viewing = this.viewingOf(actor)
    const match = q.q ? searchMatch(q.q, this.reader.dialect) : undefined
    if (viewing === null || match === null) return null
    const baseKey = `${viewing.key}|${q.projectId ?? ''}|${q.state ?? ''}|`
    const filterKey = `${baseKey}${match ?? ''}`
    const pageKey = `${filterKey}|${q.sort}|${q.limit}|${q.offset}|${q.cursor ?? ''}`
    return { viewing, match, baseKey, filterKey, pageKey }
  }

  private viewingOf(actor: Actor): Viewing | null {
    let viewing = this.viewings.get(actor.ability)
    if (viewing === undefined) {
      const allowed = accessibleWhere<IDataset>(actor.ability, 'read', 'Dataset')
      viewing = allowed === null ? null : { allowed, key: JSON.stringify(allowed) }
      this.viewings.set(actor.ability, viewing)
    }
    return viewing
  }

  private visibilityOf(em: () => EntityManager, viewing: Viewing): string {
    let sql = this.visibility.get(viewing.key)
    if (sql === undefined) {
      sql = visibilitySql(em(), viewing.allowed)
      if (this.visibility.size >= 1000) this.visibility.clear()
      this.visibility.set(viewing.key, sql)
    }
    return sql
  }

  /** The first column of a statement's rows, its time added to the request's clock. */
  private async column(clock: Clock, sql: Sql) {
    const started = performance.now()
    const values = await this.reader.column(sql.sql, sql.params)
    clock.ms += performance.now() - started
    return values
  }

  /** Runs one statement, adding its time to the request's clock. */
  private async rows<T extends unknown[]>(clock: Clock, sql: Sql) {
    const started = performance.now()
    const rows = (await this.reader.rows(sql.sql, sql.params)) as T[]
    clock.ms += performance.now() - started
    return rows
  }

  private async read(
    em: () => EntityManager,
    clock: Clock,
    request: ListRequest,
    version: number,
    q: ListDatasetsParams,
  ): Promise<Buffer> {
    const field = q.sort.replace(/^-/, '') as DatasetSortField
    const order: ListOrder = { field, descending: q.sort.startsWith('-') }
    const after = q.cursor
      ? decodeCursor(q.cursor, q.sort, SORT_COLUMNS[field].valueType)
      : undefined
    const filter: ListFilter = {
      visibility: this.visibilityOf(em, request.viewing),
      projectId: q.projectId,
      state: q.state,
      match: request.match,
    }

    // A search matching many datasets is the list without it, filtered by its match set (read
    // once per version); a walk of the sort's index testing each entry would re-read the set.
    let result: Int32Array | undefined
    if (filter.match !== undefined && !after) {
      const matches = await this.matchSetOf(clock, filter.match, version)
      if (matches.count > GATHER_MAX_ROWS) {
        result = await this.searchResult(clock, request, version, filter, order, q.sort, matches)
        this.totals.set(request.filterKey, version, result.length)
      }
    }
    let total = result?.length ?? this.totals.get(request.filterKey, version)
    if (total === undefined) {
      total = Number(
        (await this.rows<[number]>(clock, countSql(filter, this.reader.dialect)))[0]![0],
      )
      this.totals.set(request.filterKey, version, total)
    }
    if (total === 0 || (!after && q.offset >= total)) return emptyBody(total)

    const narrowed = filter.projectId !== undefined || filter.state || filter.match
    const plan: ListPlan = narrowed && total <= GATHER_MAX_ROWS ? 'gather' : 'walk'
    const ids = result
      ? result.subarray(q.offset, q.offset + q.limit + 1)
      : await this.pageIds(clock, request, version, filter, order, plan, q, after)
    const page = await this.rendered.get(
      Array.from(ids).slice(0, q.limit),
      version,
      (sql, params) => this.rows<PageRow>(clock, { sql, params }),
    )
    const last = page[page.length - 1]
    const nextCursor =
      ids.length > q.limit && last
        ? encodeCursor(q.sort, { value: sortValueOf(last, field), id: last.row[0] })
        : null
    return pageBody(page, total, nextCursor)
  }

  /**
   * The ids of the page and one more (which tells whether another page follows): after the
   * cursor, or the first pages of a list, by one short query; deep pages and searches from the
   * whole result, read once per filter, sort and access version and kept in order.
   */
  private async pageIds(
    clock: Clock,
    request: ListRequest,
    version: number,
    filter: ListFilter,
    order: ListOrder,
    plan: ListPlan,
    q: ListDatasetsParams,
    after: ListPosition | undefined,
  ): Promise<ArrayLike<number>> {
    const limit = q.limit + 1
    if (after || (filter.match === undefined && q.offset < WHOLE_RESULT_FROM)) {
      const from = after ? { at: after, inclusive: false } : undefined
      const window = { limit, offset: after ? 0 : q.offset, from }
      const rows = await this.rows<[number]>(
        clock,
        pageIdsSql(filter, order, plan, window, this.reader.dialect),
      )
      return rows.map(([id]) => id)
    }
    const key = `${request.filterKey}|${q.sort}`
    const result = await this.wholeResult(clock, key, version, filter, order, plan)
    return result.subarray(q.offset, q.offset + limit)
  }

  /** Every id the filter selects, in order; read once per filter, sort and access version. */
  private async wholeResult(
    clock: Clock,
    key: string,
    version: number,
    filter: ListFilter,
    order: ListOrder,
    plan: ListPlan,
  ): Promise<Int32Array> {
    let result = this.results.get(key, version)
    if (!result) {
      const sql = pageIdsSql(filter, order, plan, { limit: -1, offset: 0 }, this.reader.dialect)
      result = Int32Array.from(await this.column(clock, sql))
      this.results.set(key, version, result)
    }
    return result
  }

  private async matchSetOf(clock: Clock, match: string, version: number): Promise<MatchSet> {
    let set = this.matches.get(match, version)
    if (!set) {
      const ids = await this.column(clock, {
        sql: ftsRowidsSql(this.reader.dialect),
        params: [match],
      })
      const has = new Uint8Array(ids.reduce((max, id) => Math.max(max, id), 0) + 1)
      for (const id of ids) has[id] = 1
      set = { count: ids.length, has }
      this.matches.set(match, version, set)
    }
    return set
  }

  /** A broad search's result: the list without the search, in order, kept where it matches. */
  private async searchResult(
    clock: Clock,
    request: ListRequest,
    version: number,
    filter: ListFilter,
    order: ListOrder,
    sort: string,
    matches: MatchSet,
  ): Promise<Int32Array> {
    const key = `${request.filterKey}|${sort}`
    const cached = this.results.get(key, version)
    if (cached) return cached
    const unsearched = { ...filter, match: undefined }
    // Without a project or state filter the list walks its index; with one, it gathers.
    const plan: ListPlan = filter.projectId !== undefined || filter.state ? 'gather' : 'walk'
    const base = await this.wholeResult(
      clock,
      `${request.baseKey}|${sort}`,
      version,
      unsearched,
      order,
      plan,
    )
    const kept = new Int32Array(base.length)
    let n = 0
    for (const id of base) if (matches.has[id]) kept[n++] = id
    const result = kept.slice(0, n)
    this.results.set(key, version, result)
    return result
  }
}

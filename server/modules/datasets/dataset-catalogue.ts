import type { EntityManager, FilterQuery, ObjectQuery } from '@mikro-orm/better-sqlite'
import { raw } from '@mikro-orm/better-sqlite'
import type { DatasetState } from '@shared/domain/dataset-state'
import type { Page } from '@shared/schemas/common.schema'
import type {
  DatasetDto,
  DatasetSortField,
  ListDatasetsParams,
} from '@shared/schemas/dataset.schema'
import { accessibleWhere } from '../../http/access'
import { VersionedCache } from '../../http/versioned-cache'
import type { Actor } from '../../services'
import { readAccessVersion } from '../common/access-version'
import { Dataset, type IDataset } from './dataset.entity'

const COLUMN: Record<DatasetSortField, string> = {
  createdAt: 'd.created_at',
  updatedAt: 'd.updated_at',
  title: 'd.title',
  accession: 'd.accession',
  state: 'd.state',
}

/** One row of the page query: dataset columns plus the joined names, as SQLite returns them. */
interface CatalogueRow {
  id: number
  accession: string
  title: string
  description: string
  project_id: number
  project_name: string
  state: DatasetState
  embargo_until: number | null
  proposed_embargo_until: number | null
  licence: string
  version: number
  created_by_id: number | null
  creator_name: string | null
  created_at: number
  updated_at: number
  submitted_at: number | null
  approved_at: number | null
}

const iso = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString())
const day = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString().slice(0, 10))

function toDto(r: CatalogueRow): DatasetDto {
  return {
    id: r.id,
    accession: r.accession,
    title: r.title,
    description: r.description,
    project: { id: r.project_id, name: r.project_name },
    state: r.state,
    embargoUntil: day(r.embargo_until),
    proposedEmbargoUntil: day(r.proposed_embargo_until),
    licence: r.licence,
    version: r.version,
    createdBy:
      r.created_by_id === null ? null : { id: r.created_by_id, name: r.creator_name ?? '' },
    createdAt: iso(r.created_at)!,
    updatedAt: iso(r.updated_at)!,
    submittedAt: iso(r.submitted_at),
    approvedAt: iso(r.approved_at),
  }
}

/**
 * `%` and `_` are LIKE's wildcards; searched for as text they are escaped, and SQLite honours an
 * escape only when the query names one, which MikroORM's $like does not: hence a raw fragment.
 * A fragment is good for one query only, so the search filter is built afresh for each use.
 */
function searchFilter(text: string): FilterQuery<IDataset> {
  const like = `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
  const columns = ['title', 'description', 'accession']
  return {
    [raw(
      (alias: string) => `(${columns.map((c) => `${alias}.${c} like ? escape '\\'`).join(' or ')})`,
      columns.map(() => like),
    )]: [],
  }
}

function filtersFor(allowed: FilterQuery<IDataset>, q: ListDatasetsParams): ObjectQuery<IDataset> {
  const filters: FilterQuery<IDataset>[] = [structuredClone(allowed)]
  if (q.projectId) filters.push({ project: q.projectId })
  if (q.state) filters.push({ state: q.state })
  if (q.q) filters.push(searchFilter(q.q))
  return { $and: filters }
}

/** A list filter: `where()` gives a fresh copy for each query (MikroORM rewrites what it is given). */
interface CatalogueFilter {
  where(): ObjectQuery<IDataset>
  key: string
}

/**
 * The dataset list behind GET /api/datasets: narrowed in the database by the caller's abilities,
 * paged and sorted by SQLite over indexes. Counting everything someone may see grows with the
 * catalogue, and the same first pages are asked for again and again, so totals and pages are
 * kept per access version. That is exact, not a time-to-live: any change to datasets, projects,
 * shares, memberships or users raises the version in the same transaction, and the next request
 * reads afresh.
 */
export class DatasetCatalogue {
  private readonly totals = new VersionedCache<number>(2000)
  private readonly pages = new VersionedCache<Page<DatasetDto>>(500)
  /** The filter (and its cache key) per abilities object and query; abilities are reused for a second. */
  private readonly filters = new WeakMap<object, Map<string, CatalogueFilter | null>>()

  /** A page from the cache, without waiting for anything; undefined when it must be read. */
  cached(actor: Actor, q: ListDatasetsParams): Page<DatasetDto> | undefined {
    const filter = this.filterFor(actor, q)
    if (filter === null) return { items: [], total: 0 }
    if (actor.accessVersion === undefined) return undefined
    return this.pages.get(this.pageKey(filter.key, q), actor.accessVersion)
  }

  /** `em` is asked for only when the page is not cached. */
  async list(
    em: () => EntityManager,
    actor: Actor,
    q: ListDatasetsParams,
  ): Promise<Page<DatasetDto>> {
    const filter = this.filterFor(actor, q)
    if (filter === null) return { items: [], total: 0 }
    const version = actor.accessVersion ?? (await readAccessVersion(em()))
    const pageKey = this.pageKey(filter.key, q)
    const cached = this.pages.get(pageKey, version)
    if (cached) return cached
    const page = await this.read(em(), filter, version, q)
    this.pages.set(pageKey, version, page)
    return page
  }

  private pageKey(filterKey: string, q: ListDatasetsParams) {
    return `${filterKey}|${q.sort}|${q.limit}|${q.offset}`
  }

  private filterFor(actor: Actor, q: ListDatasetsParams) {
    let perAbility = this.filters.get(actor.ability)
    if (!perAbility) this.filters.set(actor.ability, (perAbility = new Map()))
    const queryKey = `${q.projectId ?? ''}|${q.state ?? ''}|${q.q ?? ''}`
    let filter = perAbility.get(queryKey)
    if (filter === undefined) {
      const allowed = accessibleWhere<IDataset>(actor.ability, 'read', 'Dataset')
      filter =
        allowed === null
          ? null
          : {
              where: () => filtersFor(allowed, q),
              key: JSON.stringify({ allowed, queryKey }),
            }
      // Free-text searches are too varied to keep; the rest are a handful per person.
      if (!q.q) perAbility.set(queryKey, filter)
    }
    return filter
  }

  private async read(
    em: EntityManager,
    filter: CatalogueFilter,
    version: number,
    q: ListDatasetsParams,
  ) {
    let total = this.totals.get(filter.key, version)
    if (total === undefined) {
      total = await em.count(Dataset, filter.where())
      this.totals.set(filter.key, version, total)
    }
    if (total === 0 || q.offset >= total) return { items: [], total }

    const descending = q.sort.startsWith('-')
    const column = COLUMN[q.sort.replace(/^-/, '') as DatasetSortField]
    const direction = descending ? 'desc' : 'asc'
    const rows = await em
      .createQueryBuilder(Dataset, 'd')
      .select([raw('d.*'), raw('p.name as project_name'), raw('u.name as creator_name')])
      .join('d.project', 'p')
      .leftJoin('d.createdBy', 'u')
      .where(filter.where())
      .orderBy([{ [raw(column)]: direction }, { id: direction }])
      .limit(q.limit)
      .offset(q.offset)
      .execute<CatalogueRow[]>('all', false)
    return { items: rows.map(toDto), total }
  }
}

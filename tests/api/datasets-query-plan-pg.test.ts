/**
 * The dataset list's queries asked of PostgreSQL's planner (EXPLAIN, JSON) on a few thousand
 * datasets, for several kinds of viewer, every sort, filter and kind of page: the counterpart of
 * datasets-query-plan.test.ts for the cluster profile. PostgreSQL picks plans by cost (it takes no
 * index hints), so what is held here is what must not happen: a page or a count that reads the
 * dataset table whole (a sequential scan), a first page that sorts rather than walks its index, a
 * search that reads the full-text table without its GIN index, a page's rows read other than by
 * primary key.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DATASET_STATES } from '@shared/domain/dataset-state'
import type { Viewer } from '@shared/permissions/viewer'
import { DATASET_SORT_FIELDS } from '@shared/schemas/dataset.schema'
import { openDatabase, type Orm } from '@server/db'
import { pageRowsSql } from '@server/modules/datasets/dataset-list-rows'
import {
  countSql,
  ftsRowidsSql,
  pageIdsSql,
  type ListFilter,
  type PageWindow,
  type Sql,
} from '@server/modules/datasets/dataset-list-sql'
import { searchTsQuery } from '@server/modules/datasets/dataset-search'
import {
  MATCHED_POSTGRESQL,
  ROWS_SQL_POSTGRESQL,
} from '@server/modules/search/public-search.service'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'
import { LIST_VIEWERS, listVisibility } from '../fixtures/list-viewers'

const DATASETS = 6000
const PROJECTS = 12
let postgres: PostgresServer
let orm: Orm

beforeAll(async () => {
  postgres = await startPostgres()
  orm = await openDatabase({ driver: 'postgresql', url: await postgres.createDatabase() })
  const sql = (text: string) => orm.em.getConnection().execute(text)
  await sql(
    `insert into project (name, description, created_at)
     select 'Plan project ' || i, '', now() from generate_series(1, ${PROJECTS}) i`,
  )
  // States spread as in datasets-query-plan.test.ts; titles from a few words, so searches match
  // a sixth of the datasets or a few.
  const states = `(array[${DATASET_STATES.map((s) => `'${s}'`).join(', ')}])`
  await sql(
    `insert into dataset (accession, title, description, project_id, state, licence, version, created_at, updated_at)
     select 'STPL-' || lpad(i::text, 6, '0'),
       (array['actin', 'tubulin', 'clathrin', 'Nup96', 'PSD-95', 'Bassoon'])[1 + i % 6] || ' series ' || i,
       case when i % 500 = 0 then 'cryo-fixed cells' else 'Imaged in cells, acquisition ' || i % 17 end,
       1 + (i * 7) % ${PROJECTS}, ${states}[1 + (i * 3 + (i >> 4)) % ${DATASET_STATES.length}],
       'CC-BY-4.0', 1,
       timestamptz '2024-01-01' + i * interval '1 minute',
       timestamptz '2024-01-01' + ((i * 7919) % ${DATASETS}) * interval '1 minute'
     from generate_series(1, ${DATASETS}) i`,
  )
  // What autovacuum does on its own soon after: statistics and the visibility map.
  await vacuumUntilAllVisible(sql)
}, 120_000)

/**
 * VACUUM ANALYZE, again until every page of every table is marked all-visible. The plans held
 * below count on that (index-only scans cost less than reading the table only when the visibility
 * map says the heap need not be visited), and one VACUUM does not always get there: a page stays
 * unmarked while any open snapshot, such as an autovacuum ANALYZE of the fresh tables running at
 * the same moment on a loaded machine, is older than its rows.
 */
async function vacuumUntilAllVisible(sql: (text: string) => Promise<unknown>) {
  const deadline = Date.now() + 60_000
  for (;;) {
    await sql('vacuum analyze')
    const unmarked = (await sql(
      `select relname from pg_class join pg_namespace on pg_namespace.oid = relnamespace
       where nspname = 'public' and relkind = 'r' and relallvisible < relpages`,
    )) as { relname: string }[]
    if (!unmarked.length) return
    if (Date.now() > deadline)
      throw new Error(`tables never became all-visible: ${unmarked.map((t) => t.relname)}`)
    await new Promise((resolve) => setTimeout(resolve, 250))
  }
}
afterAll(async () => {
  await orm?.close()
  await postgres?.stop()
})

const VIEWERS = LIST_VIEWERS
const visibilityOf = (v: Viewer | null) => listVisibility(orm.em.fork(), v)

interface PlanNode {
  'Node Type': string
  'Relation Name'?: string
  'Index Name'?: string
  Plans?: PlanNode[]
}

/** Every node of the plan, depth first, as "type on relation using index". */
async function planOf({ sql, params }: Sql): Promise<string[]> {
  const [row] = await orm.em
    .getConnection()
    .execute<[{ 'QUERY PLAN': [{ Plan: PlanNode }] }]>(`explain (format json) ${sql}`, params)
  const nodes: string[] = []
  const visit = (n: PlanNode) => {
    nodes.push(
      [
        n['Node Type'],
        n['Relation Name'] && `on ${n['Relation Name']}`,
        n['Index Name'] && `using ${n['Index Name']}`,
      ]
        .filter(Boolean)
        .join(' '),
    )
    n.Plans?.forEach(visit)
  }
  visit(row['QUERY PLAN'][0].Plan)
  return nodes
}

const tableScans = (plan: string[]) => plan.filter((n) => n === 'Seq Scan on dataset')
const sorts = (plan: string[]) => plan.filter((n) => n === 'Sort')
const usesGin = (plan: string[]) =>
  plan.includes('Bitmap Index Scan using dataset_search_document_index')
const searchScans = (plan: string[]) => plan.filter((n) => n === 'Seq Scan on dataset_search')

const FILTERS: Record<string, Omit<ListFilter, 'visibility'>> = {
  none: {},
  project: { projectId: 3 },
  state: { state: 'submitted' },
}
const SEARCHES: Record<string, Omit<ListFilter, 'visibility'>> = {
  'broad search': { match: searchTsQuery('tubulin series')! },
  'rare search': { match: searchTsQuery('cryo')! },
  'search and state': { match: searchTsQuery('actin')!, state: 'approved' },
}
const WINDOWS: Record<string, PageWindow> = {
  'first page': { limit: 51, offset: 0 },
  'page by offset': { limit: 51, offset: 150 },
  'after a cursor': { limit: 51, offset: 0, from: { at: { value: 0, id: 1 }, inclusive: false } },
}
/** A cursor's position: epoch milliseconds for dates (as cursors carry them), else text. */
const positionFor = (field: string) => (field.endsWith('At') ? Date.UTC(2024, 0, 2) : 'm')

describe('dataset list query plans on PostgreSQL', () => {
  for (const [who, v] of Object.entries(VIEWERS)) {
    it(`counts for ${who} without reading the table whole`, async () => {
      const visibility = visibilityOf(v)
      for (const [filterName, filter] of Object.entries({ ...FILTERS, ...SEARCHES })) {
        const plan = await planOf(countSql({ visibility, ...filter }, 'postgresql'))
        expect({ filterName, plan, scans: tableScans(plan) }).toMatchObject({ scans: [] })
        if (filter.match)
          expect({ filterName, plan, gin: usesGin(plan) }).toMatchObject({ gin: true })
      }
    })

    it(`reads pages for ${who} in every sort without reading the table whole`, async () => {
      const visibility = visibilityOf(v)
      for (const field of DATASET_SORT_FIELDS)
        for (const descending of [false, true])
          for (const [filterName, filter] of Object.entries(FILTERS))
            for (const [windowName, window] of Object.entries(WINDOWS)) {
              const w = window.from
                ? { ...window, from: { ...window.from, at: { value: positionFor(field), id: 1 } } }
                : window
              const order = { field, descending }
              // The catalogue walks a list the filter keeps large, and gathers a small one.
              const listPlan = filterName === 'none' ? 'walk' : 'gather'
              const plan = await planOf(
                pageIdsSql({ visibility, ...filter }, order, listPlan, w, 'postgresql'),
              )
              const shape = { field, descending, filterName, windowName, plan }
              expect({ ...shape, scans: tableScans(plan) }).toMatchObject({ scans: [] })
              // A page of the whole list follows its sort's index: nothing sorted.
              if (filterName === 'none')
                expect({ ...shape, sorts: sorts(plan) }).toMatchObject({ sorts: [] })
            }
    })

    it(`finds the matches of searches for ${who} through the GIN index`, async () => {
      const visibility = visibilityOf(v)
      for (const field of DATASET_SORT_FIELDS)
        for (const [searchName, filter] of Object.entries(SEARCHES)) {
          const plan = await planOf(
            pageIdsSql(
              { visibility, ...filter },
              { field, descending: true },
              'gather',
              WINDOWS['first page']!,
              'postgresql',
            ),
          )
          const shape = { field, searchName, plan }
          expect({ ...shape, gin: usesGin(plan) }).toMatchObject({ gin: true })
          expect({ ...shape, scans: searchScans(plan) }).toMatchObject({ scans: [] })
        }
    })
  }

  it("reads a search's matches through the GIN index", async () => {
    const plan = await planOf({
      sql: ftsRowidsSql('postgresql'),
      params: [searchTsQuery('tubulin')],
    })
    expect(usesGin(plan)).toBe(true)
    expect(searchScans(plan)).toEqual([])
  })

  it('reads the rows of a page by primary key', async () => {
    const plan = await planOf({ sql: pageRowsSql('postgresql'), params: ['[1,2,3]'] })
    expect(tableScans(plan)).toEqual([])
    expect(plan).toContain('Index Scan on dataset using dataset_pkey')
  })

  it("reads the public search's approved datasets through an index, searched or not", async () => {
    for (const sql of [
      { sql: ROWS_SQL_POSTGRESQL, params: [] },
      { sql: ROWS_SQL_POSTGRESQL + MATCHED_POSTGRESQL, params: [searchTsQuery('tubulin')] },
    ]) {
      const plan = await planOf(sql)
      expect({ plan, scans: tableScans(plan) }).toMatchObject({ scans: [] })
      expect(plan.some((n) => /Index( Only)? Scan .*using dataset_/.test(n))).toBe(true)
    }
  })

  it('fail on a sequential scan with a sort, as an unindexed sort would run', async () => {
    const plan = await planOf({
      sql: `select d."id" from "dataset" d where d."licence" = ? order by d."description", d."id" limit 50`,
      params: ['CC-BY-4.0'],
    })
    expect(tableScans(plan)).not.toEqual([])
    expect(sorts(plan)).not.toEqual([])
  })
})

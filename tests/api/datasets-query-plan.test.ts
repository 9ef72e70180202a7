/**
 * Every query shape the dataset list runs, asked of SQLite's planner (EXPLAIN QUERY PLAN) on a
 * few thousand datasets, for several kinds of viewer, every sort and every filter: none may read
 * the whole table and sort it. A walk must follow its sort's index (no sort step at all); a
 * gather, which sorts, must select its rows through an index or the full-text index; counts and
 * the read of a page's rows must not scan the table.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DATASET_STATES } from '@shared/domain/dataset-state'
import type { Viewer } from '@shared/permissions/viewer'
import { DATASET_SORT_FIELDS } from '@shared/schemas/dataset.schema'
import { openDatabase, type Orm } from '@server/db'
import { PAGE_ROWS_SQL } from '@server/modules/datasets/dataset-list-rows'
import {
  FTS_ROWIDS,
  countSql,
  pageIdsSql,
  type ListFilter,
  type ListPlan,
  type PageWindow,
  type Sql,
} from '@server/modules/datasets/dataset-list-sql'
import { searchExpression } from '@server/modules/datasets/dataset-search'
import { LIST_VIEWERS, listVisibility } from '../fixtures/list-viewers'

const DATASETS = 3000
const PROJECTS = 12
let orm: Orm

beforeAll(async () => {
  orm = await openDatabase(':memory:')
  const knex = orm.em.getKnex()
  await knex('project').insert(
    Array.from({ length: PROJECTS }, (_, i) => ({
      name: `Plan project ${i + 1}`,
      description: '',
      created_at: 0,
    })),
  )
  const words = ['actin', 'tubulin', 'clathrin', 'Nup96', 'PSD-95', 'Bassoon']
  for (let start = 0; start < DATASETS; start += 500) {
    await knex('dataset').insert(
      Array.from({ length: 500 }, (_, k) => {
        const i = start + k
        return {
          accession: `STPL-${String(i + 1).padStart(6, '0')}`,
          title: `${words[i % words.length]} series ${i}`,
          description: `Imaged in cells, acquisition ${i % 17}`,
          project_id: 1 + ((i * 7) % PROJECTS),
          state: DATASET_STATES[(i * 3 + (i >> 4)) % DATASET_STATES.length],
          licence: 'CC-BY-4.0',
          version: 1,
          created_at: 1_700_000_000_000 + i * 60_000,
          updated_at: 1_700_000_000_000 + ((i * 7919) % DATASETS) * 60_000,
        }
      }),
    )
  }
})
afterAll(() => orm.close())

const VIEWERS = LIST_VIEWERS
const visibilityOf = (v: Viewer | null) => listVisibility(orm.em.fork(), v)

async function planOf({ sql, params }: Sql): Promise<string[]> {
  const rows = await orm.em
    .getConnection()
    .execute<{ detail: string }[]>(`explain query plan ${sql}`, params)
  return rows.map((r) => r.detail)
}

const tableScan = (plan: string[]) => plan.filter((l) => /^SCAN (d|dataset)\b(?! USING)/.test(l))
const indexScan = (plan: string[]) => plan.filter((l) => /^SCAN (d|dataset) USING/.test(l))
const sorts = (plan: string[]) => plan.filter((l) => l.includes('TEMP B-TREE FOR ORDER BY'))
/** A full-text lookup must use MATCH (an index plan containing M), never list the whole table. */
const ftsScans = (plan: string[]) =>
  plan.filter((l) => /VIRTUAL TABLE/.test(l) && !/INDEX \d+:M/.test(l))

const FILTERS: Record<string, Omit<ListFilter, 'visibility'>> = {
  none: {},
  project: { projectId: 3 },
  state: { state: 'submitted' },
  search: { match: searchExpression('tubulin series')! },
  'search and state': { match: searchExpression('actin')!, state: 'approved' },
}
const WINDOWS: Record<string, PageWindow> = {
  'first page': { limit: 51, offset: 0 },
  'page by offset': { limit: 51, offset: 150 },
  'after a cursor': { limit: 51, offset: 0, from: { at: { value: 0, id: 1 }, inclusive: false } },
  'whole result': { limit: -1, offset: 0 },
}

describe.each([
  ['with planner statistics', true],
  ['before statistics', false],
])('dataset list query plans %s', (_, analysed) => {
  beforeAll(async () => {
    const connection = orm.em.getConnection()
    if (analysed) await connection.execute('analyze')
    else await connection.execute('drop table if exists sqlite_stat1')
  })

  for (const [who, v] of Object.entries(VIEWERS)) {
    it(`counts for ${who} without scanning the table`, async () => {
      const visibility = visibilityOf(v)
      for (const filter of Object.values(FILTERS)) {
        const plan = await planOf(countSql({ visibility, ...filter }))
        expect({ filter, plan, scans: tableScan(plan) }).toMatchObject({ scans: [] })
        expect({ filter, plan, ftsScans: ftsScans(plan) }).toMatchObject({ ftsScans: [] })
      }
    })

    it(`reads pages for ${who} in every sort without a full scan and a sort`, async () => {
      const visibility = visibilityOf(v)
      for (const field of DATASET_SORT_FIELDS) {
        for (const descending of [false, true]) {
          for (const [filterName, filter] of Object.entries(FILTERS)) {
            const plans: ListPlan[] = filterName === 'none' ? ['walk'] : ['walk', 'gather']
            for (const listPlan of plans) {
              for (const [windowName, window] of Object.entries(WINDOWS)) {
                const value = field.endsWith('At') ? 0 : 'a'
                const w = window.from
                  ? { ...window, from: { ...window.from, at: { value, id: 1 } } }
                  : window
                const sql = pageIdsSql(
                  { visibility, ...filter },
                  { field, descending },
                  listPlan,
                  w,
                )
                const plan = await planOf(sql)
                const shape = { field, descending, filterName, listPlan, windowName, plan }
                expect({ ...shape, scans: tableScan(plan) }).toMatchObject({ scans: [] })
                expect({ ...shape, ftsScans: ftsScans(plan) }).toMatchObject({ ftsScans: [] })
                if (listPlan === 'walk') {
                  // In order along the sort's own index: never a sort step.
                  expect({ ...shape, sorts: sorts(plan) }).toMatchObject({ sorts: [] })
                  expect(plan.join('\n')).toContain(`dataset_list_`)
                } else if (sorts(plan).length) {
                  // A gather sorts only the rows its filter's index or the full-text index found.
                  expect({ ...shape, indexScans: indexScan(plan) }).toMatchObject({
                    indexScans: [],
                  })
                }
              }
            }
          }
        }
      }
    })
  }

  it("reads a search's matches through the full-text index", async () => {
    const plan = await planOf({ sql: FTS_ROWIDS, params: [searchExpression('tubulin')] })
    expect(plan).toHaveLength(1)
    expect(ftsScans(plan)).toEqual([])
  })

  it('reads the rows of a page by primary key', async () => {
    const plan = await planOf({ sql: PAGE_ROWS_SQL, params: ['[1,2,3]'] })
    expect(tableScan(plan)).toEqual([])
    expect(sorts(plan)).toEqual([])
    expect(plan.filter((l) => l.includes('USING INTEGER PRIMARY KEY'))).toHaveLength(3)
  })
})

describe('the plan checks themselves', () => {
  it('fail on a full scan with a sort, as the old list ran for an unindexed sort', async () => {
    const plan = await planOf({
      sql: 'select d.id from `dataset` d where d.`licence` = ? order by d.`description`, d.`id` limit 50',
      params: ['CC-BY-4.0'],
    })
    expect(tableScan(plan)).not.toEqual([])
    expect(sorts(plan)).not.toEqual([])
  })

  it('fail on a full-text table read without MATCH', async () => {
    const plan = await planOf({
      sql: 'select rowid from `dataset_fts` where title = ?',
      params: ['x'],
    })
    expect(ftsScans(plan)).not.toEqual([])
  })
})

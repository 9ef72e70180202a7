/**
 * The migration that made regions their own table: comments that carried a region as JSON keep
 * it as a Region on the dataset's first localization table (a rectangle's corners become a
 * closed ring), and where the dataset has no table the coordinates stay in the comment's text.
 */
import { MikroORM } from '@mikro-orm/better-sqlite'
import { afterAll, beforeAll, expect, it } from 'vitest'
import { createOrmConfig } from '@server/orm-config'

let orm: MikroORM
const sql = (q: string, params: unknown[] = []) => orm.em.getConnection().execute(q, params)

beforeAll(async () => {
  orm = await MikroORM.init(createOrmConfig(':memory:'))
  await orm.getMigrator().up({ to: 'Migration20261204193454' })
  await sql(`insert into organization (id, name, created_at) values (1, 'Lab', 0)`)
  await sql(
    `insert into user (id, email, name, subject, organization_id, created_at) values (1, 'a@lab.test', 'A', 's1', 1, 0)`,
  )
  await sql(`insert into project (id, name, description, created_at) values (1, 'P', '', 0)`)
  for (const id of [1, 2])
    await sql(
      `insert into dataset (id, accession, title, description, project_id, state, licence, version, created_at, updated_at)
       values (?, ?, 'D', '', 1, 'draft', 'CC-BY-4.0', 1, 0, 0)`,
      [id, `STPL-00000${id}`],
    )
  await sql(
    `insert into dataset_file (id, dataset_id, name, size, derived_bytes, kind, status, storage_key, created_at)
     values (7, 1, 't.csv', 10, 0, 'localization_table', 'ready', 'k7', 0)`,
  )
  const insert = (id: number, dataset: number, region: object) =>
    sql(
      `insert into comment (id, dataset_id, author_id, body, region, created_at) values (?, ?, 1, 'Look', ?, 0)`,
      [id, dataset, JSON.stringify(region)],
    )
  await insert(1, 1, {
    shape: 'rectangle',
    pointsNm: [
      [10, 20],
      [30, 50],
    ],
  })
  await insert(2, 1, { shape: 'point', pointsNm: [[5, 6]] })
  await insert(3, 1, {
    shape: 'polygon',
    pointsNm: [
      [0, 0],
      [10, 0],
      [0, 10],
    ],
  })
  await insert(4, 2, { shape: 'point', pointsNm: [[1, 2]] })
  await orm.getMigrator().up()
})
afterAll(() => orm.close())

it('turns each comment region into a Region on the first table, and keeps the others in the text', async () => {
  const regions = await sql(`select * from region order by id`)
  const comments = await sql(`select id, region_id, body from comment order by id`)
  const geometryOf = (commentId: number) => {
    const regionId = comments.find((c) => c.id === commentId)!.region_id
    return JSON.parse(regions.find((r) => r.id === regionId)!.geometry as string)
  }
  expect(regions).toHaveLength(3)
  expect(regions.every((r) => r.file_id === 7 && r.dataset_id === 1 && r.author_id === 1)).toBe(
    true,
  )
  expect(geometryOf(1)).toEqual({
    type: 'Polygon',
    coordinates: [
      [
        [10, 20],
        [30, 20],
        [30, 50],
        [10, 50],
        [10, 20],
      ],
    ],
  })
  expect(geometryOf(2)).toEqual({ type: 'Point', coordinates: [5, 6] })
  expect(geometryOf(3)).toEqual({
    type: 'Polygon',
    coordinates: [
      [
        [0, 0],
        [10, 0],
        [0, 10],
        [0, 0],
      ],
    ],
  })
  const kept = comments.find((c) => c.id === 4)!
  expect(kept.region_id).toBeNull()
  expect(kept.body).toContain('"pointsNm":[[1,2]]')
})

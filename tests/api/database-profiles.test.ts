import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ConfigError, loadConfig, type DatabaseTarget } from '@server/config'
import { databaseDriver, openDatabase, type Orm } from '@server/db'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { readAccessVersion } from '@server/modules/common/access-version'
import { nextSequenceValue } from '@server/modules/common/sequence.service'
import { ApiToken } from '@server/modules/tokens/api-token.entity'
import { User } from '@server/modules/users/user.entity'
import { userIdsContaining } from '@server/modules/users/user-text-search'
import type { FilterQuery } from '@mikro-orm/core'
import { visibilitySql } from '@server/modules/datasets/dataset-catalogue'
import { pageIdsSql } from '@server/modules/datasets/dataset-list-sql'
import { DATASET_SORT_FIELDS } from '@shared/schemas/dataset.schema'
import { QualityReport } from '@server/modules/quality/quality-report.entity'
import { publicSearch } from '@server/modules/search/public-search.service'
import { publicSearchQuerySchema } from '@shared/schemas/public-search.schema'
import type { IDataset } from '@server/modules/datasets/dataset.entity'
import { ReadConnection } from '@server/modules/common/read-connection'
import { PreviewTables } from '@server/modules/preview/preview-tables'
import { buildDataset, buildMember, buildProject, buildReadyFile } from '../fixtures/builders'
import { postgresBinaries, startPostgres, type PostgresServer } from '../fixtures/postgres'
import { createTestApp } from '../fixtures/test-app'
import { freePort, ServerProcess } from '../fixtures/server-process'
import request from 'supertest'
import { bearer, tokenFor } from '../fixtures/builders'

let postgres: PostgresServer
const scratch = mkdtempSync(join(tmpdir(), 'stipple-profiles-'))
beforeAll(async () => {
  postgres = await startPostgres()
}, 60_000)
afterAll(async () => {
  await postgres?.stop()
  rmSync(scratch, { recursive: true, force: true })
})

let files = 0
const profiles: {
  name: string
  driver: DatabaseTarget['driver']
  target: () => Promise<DatabaseTarget>
}[] = [
  {
    name: 'SQLite',
    driver: 'sqlite',
    target: async () => ({ driver: 'sqlite', path: join(scratch, `db-${++files}.sqlite`) }),
  },
  {
    name: 'PostgreSQL',
    driver: 'postgresql',
    target: async () => ({ driver: 'postgresql', url: await postgres.createDatabase() }),
  },
]

/** An empty database of the profile, brought up by that profile's committed migrations. */
async function withEmptyDatabase(
  profile: (typeof profiles)[number],
  work: (orm: Orm) => Promise<void>,
) {
  const orm = await openDatabase(await profile.target())
  try {
    await work(orm)
  } finally {
    await orm.close()
  }
}

describe.each(profiles)('the $name profile', (profile) => {
  it('migrates an empty database to exactly the schema the entities describe', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      expect(databaseDriver(orm)).toBe(profile.name === 'SQLite' ? 'sqlite' : 'postgresql')
      expect(await orm.schema.getUpdateSchemaSQL({ wrap: false })).toBe('')
    })
  })

  it('keeps the audit trail append-only in the database itself', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      em.create(AuditEvent, {
        action: 'dataset.create',
        targetType: 'dataset',
        targetId: '1',
        time: new Date('2026-01-02T03:04:05Z'),
      })
      await em.flush()
      // Past the ORM's own refusal (its hooks): plain SQL, as any other client would send it.
      const connection = orm.em.getConnection()
      await expect(
        connection.execute(`update "audit_event" set "action" = 'dataset.delete'`),
      ).rejects.toThrow(/append-only/)
      await expect(connection.execute(`delete from "audit_event"`)).rejects.toThrow(/append-only/)
      const rows = await connection.execute<{ action: string }[]>(
        `select "action" from "audit_event"`,
      )
      expect(rows).toEqual([{ action: 'dataset.create' }])
    })
  })

  it('keeps audit details in the order they were written', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const details = { reason: 'Paper delayed', from: '2026-06-01', to: '2026-09-01', by: 7 }
      const em = orm.em.fork()
      const event = em.create(AuditEvent, {
        action: 'dataset.embargo',
        targetType: 'dataset',
        targetId: '1',
        time: new Date('2026-01-02T03:04:05Z'),
        details,
      })
      await em.flush()
      const read = await orm.em.fork().findOneOrFail(AuditEvent, event.id)
      expect(Object.keys(read.details!)).toEqual(['reason', 'from', 'to', 'by'])
      expect(read.details).toEqual(details)
    })
  })

  it('hands out the numbers of a named sequence in order, each once', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      const taken: number[] = []
      for (let i = 0; i < 3; i++) taken.push(await nextSequenceValue(em, 'accession'))
      expect(taken).toEqual([1, 2, 3])
      expect(await nextSequenceValue(em, 'another')).toBe(1)
    })
  })

  it('finds a dataset and its table for the tile route through the read connection', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      const owner = await buildMember(em)
      const project = await buildProject(em, [{ user: owner, role: 'owner' }])
      const embargoUntil = new Date('2027-03-04T00:00:00Z')
      const dataset = await buildDataset(em, project.id, { state: 'approved', embargoUntil })
      const table = await buildReadyFile(em, dataset.id, { name: 'spots.csv' })
      table.kind = 'localization_table'
      table.report = { rows: 1200, rejected: { total: 0 } }
      await em.flush()

      const reads = new ReadConnection(orm)
      try {
        const tables = new PreviewTables(reads)
        const byId = await tables.find(String(dataset.id), table.id)
        expect(byId.dataset).toEqual({
          id: dataset.id,
          accession: dataset.accession,
          project: project.id,
          state: 'approved',
          embargoUntil,
        })
        expect(byId.table).toMatchObject({
          id: table.id,
          kind: 'localization_table',
          status: 'ready',
          name: 'spots.csv',
        })
        expect(await byId.table!.report()).toEqual({ rows: 1200, rejected: { total: 0 } })

        const byAccession = await tables.find(dataset.accession.toLowerCase(), table.id + 1)
        expect(byAccession).toEqual({ dataset: byId.dataset, table: null })
        expect(await tables.find('999999', table.id)).toEqual({ dataset: null, table: null })
        // The other shapes the dataset list reads in.
        const sql = 'select id, accession from dataset where id = ?'
        expect(await reads.rows(sql, [dataset.id])).toEqual([[dataset.id, dataset.accession]])
        expect(await reads.column(sql, [dataset.id])).toEqual([dataset.id])
      } finally {
        reads.close()
      }
    })
  })

  it("narrows the dataset list with the SQL a viewer's abilities give", async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      const owner = await buildMember(em)
      const project = await buildProject(em, [{ user: owner, role: 'owner' }])
      const other = await buildProject(em, [{ user: owner, role: 'owner' }])
      const approved = await buildDataset(em, other.id, { state: 'approved' })
      const draft = await buildDataset(em, project.id)
      await buildDataset(em, other.id)

      const reads = new ReadConnection(orm)
      try {
        const visible = async (allowed: FilterQuery<IDataset>) => {
          const where = visibilitySql(em, allowed)
          const sql = `select d.id from dataset d${where ? ` where ${where}` : ''} order by d.id`
          return reads.column(sql, [])
        }
        // A member of one project who may read approved datasets anywhere.
        const member: FilterQuery<IDataset> = {
          $or: [{ state: { $in: ['approved', 'withdrawn'] } }, { project: project.id }],
        }
        expect(await visible(member)).toEqual([approved.id, draft.id])
        expect(await visible({})).toHaveLength(3)
      } finally {
        reads.close()
      }
    })
  })

  it('lists and searches datasets with totals, sorts, filters, offsets and cursors', async () => {
    const t = await createTestApp({}, { database: profile.driver })
    try {
      const em = t.em()
      const member = await buildMember(em)
      const project = await buildProject(em, [{ user: member, role: 'owner' }])
      const outsider = await tokenFor(em, await buildMember(em))
      const owner = await tokenFor(em, member)
      const base = Date.UTC(2026, 0, 1)
      const built = []
      for (let i = 0; i < 7; i++)
        built.push(
          await buildDataset(em, project.id, {
            title: `Series ${i % 3}`,
            state: i % 2 ? 'draft' : 'approved',
            // Pairs share a creation time, so the id must break ties for a cursor to be exact.
            createdAt: new Date(base + Math.floor(i / 2) * 60_000),
            complete: false,
          }),
        )
      const list = async (query: string, token = owner) => {
        const res = await request(t.app).get(`/api/datasets?${query}`).set(bearer(token))
        expect(res.status, res.text).toBe(200)
        return res.body as { items: { id: number }[]; total: number; nextCursor: string | null }
      }
      const ids = (page: { items: { id: number }[] }) => page.items.map((d) => d.id)
      const newestFirst = [...built]
        .sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime() || b.id - a.id)
        .map((d) => d.id)

      const first = await list('sort=-createdAt&limit=3')
      expect(first.total).toBe(7)
      expect(ids(first)).toEqual(newestFirst.slice(0, 3))
      const second = await list(`sort=-createdAt&limit=3&cursor=${first.nextCursor}`)
      const third = await list(`sort=-createdAt&limit=3&cursor=${second.nextCursor}`)
      expect([...ids(second), ...ids(third)]).toEqual(newestFirst.slice(3))
      expect(third.nextCursor).toBeNull()
      expect(ids(await list('sort=-createdAt&limit=3&offset=3'))).toEqual(newestFirst.slice(3, 6))

      const byTitle = await list('sort=title&limit=50')
      const titles = byTitle.items.map((d) => (d as unknown as { title: string }).title)
      expect(titles).toEqual([...titles].sort())
      expect((await list(`state=draft&projectId=${project.id}`)).total).toBe(3)
      // Searching goes through the database's own full-text index.
      const accented = await buildDataset(em, project.id, { title: 'Épitope map', complete: false })
      expect(ids(await list('q=EPITOP'))).toEqual([accented.id])
      expect((await list('q=series 1')).total).toBe(2)
      expect(ids(await list(`q=${built[4]!.accession}`))).toEqual([built[4]!.id])
      expect((await list('q=series tubulin')).total).toBe(0)
      // Someone outside the project sees the approved ones only, searching or not.
      expect((await list('sort=createdAt', outsider)).total).toBe(4)
      expect((await list('q=series', outsider)).total).toBe(4)
    } finally {
      await t.close()
    }
  })

  it('lists the public catalogue with the metadata its facets read', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      const owner = await buildMember(em)
      const project = await buildProject(em, [{ user: owner, role: 'owner' }])
      const released = await buildDataset(em, project.id, { state: 'approved' })
      await buildDataset(em, project.id, { state: 'submitted' })
      const table = await buildReadyFile(em, released.id, { name: 'spots.csv' })
      em.create(QualityReport, {
        file: table.id,
        findings: { frcResolutionNm: 42.5 } as never,
        inputs: {},
        computedAt: new Date('2026-01-02T00:00:00Z'),
      })
      await em.flush()

      const now = new Date('2030-01-01T00:00:00Z')
      const page = await publicSearch(orm.em.fork(), publicSearchQuerySchema.parse({}), now)
      expect(page.total).toBe(1)
      expect(page.items[0]).toMatchObject({
        accession: released.accession,
        technique: 'dSTORM',
        structure: 'nuclear pore complex',
        organism: 'Mus musculus',
        probeClasses: ['organic dye'],
        authors: ['Avery Tester'],
        frcResolutionNm: 42.5,
      })
      expect(page.facets.technique).toEqual([{ value: 'dSTORM', count: 1 }])
      // Words go through the database's full-text index, metadata terms included.
      const search = (words: string) =>
        publicSearch(orm.em.fork(), publicSearchQuerySchema.parse({ q: words }), now)
      expect((await search('NUCLEAR por')).items.map((i) => i.accession)).toEqual([
        released.accession,
      ])
      expect((await search('dstorm mus musculus')).total).toBe(1)
      expect((await search('nuclear tubulin')).total).toBe(0)
    })
  })

  it('finds people by a piece of their name or e-mail, any case, wildcards taken literally', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      const ada = em.create(User, { email: 'ada_l@lab.example', name: 'Ada Lovelace' })
      const grace = em.create(User, { email: 'grace@navy.example', name: 'Grace 100% Hopper' })
      em.create(User, { email: 'alan@lab.example', name: 'Alan Turing' })
      await em.flush()
      const find = async (text: string, limit?: number) =>
        (await userIdsContaining(em, text, limit)).sort((a, b) => a - b)
      expect(await find('LOVE')).toEqual([ada.id])
      expect(await find('NAVY.example')).toEqual([grace.id])
      expect(await find('100%')).toEqual([grace.id])
      expect(await find('%')).toEqual([grace.id])
      expect(await find('_')).toEqual([ada.id])
      expect(await find('a\\')).toEqual([])
      expect(await find('nobody')).toEqual([])
      expect(await find('lab.example')).toHaveLength(2)
      expect(await find('lab.example', 1)).toHaveLength(1)
    })
  })

  it('raises the access version on access-relevant changes only, in the same transaction', async () => {
    await withEmptyDatabase(profile, async (orm) => {
      const em = orm.em.fork()
      const start = await readAccessVersion(em)
      expect(start).toBeGreaterThanOrEqual(1)

      const user = em.create(User, { email: 'ada@lab.example', name: 'Ada' })
      await em.flush()
      const afterUser = await readAccessVersion(em)
      expect(afterUser).toBeGreaterThan(start)

      const token = em.create(ApiToken, {
        user: user.id,
        name: 'scripts',
        tokenHash: 'f'.repeat(64),
        prefix: 'stp_ffff',
      })
      await em.flush()
      const afterToken = await readAccessVersion(em)
      expect(afterToken).toBeGreaterThan(afterUser)

      // Using a token says nothing about access; revoking it does.
      token.lastUsedAt = new Date('2026-01-02T00:00:00Z')
      await em.flush()
      expect(await readAccessVersion(em)).toBe(afterToken)
      token.revokedAt = new Date('2026-01-03T00:00:00Z')
      await em.flush()
      expect(await readAccessVersion(em)).toBeGreaterThan(afterToken)

      // A rolled-back change leaves the version where it was.
      const before = await readAccessVersion(em)
      await expect(
        em.transactional(async (tx) => {
          tx.create(User, { email: 'grace@lab.example', name: 'Grace' })
          await tx.flush()
          expect(await readAccessVersion(tx)).toBeGreaterThan(before)
          throw new Error('roll back')
        }),
      ).rejects.toThrow('roll back')
      expect(await readAccessVersion(orm.em.fork())).toBe(before)
    })
  })
})

describe('choosing the database by configuration', () => {
  const env = { NODE_ENV: 'test', DATA_DIR: scratch } as const

  it('stays on the SQLite file in DATA_DIR without DATABASE_URL', () => {
    expect(loadConfig({ ...env }).database).toEqual({
      driver: 'sqlite',
      path: join(scratch, 'stipple.sqlite'),
    })
  })

  it('runs on PostgreSQL when DATABASE_URL names a server', async () => {
    const url = await postgres.createDatabase()
    const config = loadConfig({ ...env, DATABASE_URL: url })
    expect(config.database).toEqual({ driver: 'postgresql', url })
    const orm = await openDatabase(config.database)
    try {
      expect(databaseDriver(orm)).toBe('postgresql')
      const tables = await orm.em
        .getConnection()
        .execute<{ count: string }[]>(
          `select count(*) as "count" from information_schema.tables where table_schema = 'public' and table_name = 'dataset'`,
        )
      expect(Number(tables[0]!.count)).toBe(1)
    } finally {
      await orm.close()
    }
  })

  it('runs the real server on PostgreSQL with DATABASE_URL alone, leaving no SQLite file', async () => {
    const url = await postgres.createDatabase()
    const dataDir = mkdtempSync(join(scratch, 'server-'))
    const server = new ServerProcess(await freePort(), {
      DATABASE_URL: url,
      DATA_DIR: dataDir,
      DEMO: 'true',
      DEMO_TABLES: 'false',
    })
    try {
      await server.start()
      const search = (await (await fetch(`${server.url}/api/search`)).json()) as {
        items: { accession: string }[]
      }
      expect(search.items.length).toBeGreaterThan(3)
      // The rows it served are PostgreSQL's.
      const orm = await openDatabase({ driver: 'postgresql', url })
      try {
        const rows = await orm.em
          .getConnection()
          .execute<{ accession: string }[]>(
            `select accession from dataset where state = 'approved'`,
          )
        expect(rows.map((r) => r.accession).sort()).toEqual(
          search.items.map((i) => i.accession).sort(),
        )
      } finally {
        await orm.close()
      }
      expect(readdirSync(dataDir).filter((name) => name.includes('sqlite'))).toEqual([])
      expect(existsSync(join(dataDir, 'stipple.sqlite'))).toBe(false)
    } finally {
      await server.stop()
    }
  }, 120_000)

  it('refuses a DATABASE_URL of another kind of database', () => {
    expect(() => loadConfig({ ...env, DATABASE_URL: 'mysql://db.example/stipple' })).toThrow(
      ConfigError,
    )
  })
})

describe('the dataset list on PostgreSQL', () => {
  it('walks the sort index for a first page instead of sorting the whole table', async () => {
    const orm = await openDatabase({ driver: 'postgresql', url: await postgres.createDatabase() })
    try {
      const sql = (text: string, params: unknown[] = []) =>
        orm.em.getConnection().execute<Record<string, unknown>[]>(text, params)
      await sql(`insert into project (name, description, created_at) values ('P', '', now())`)
      await sql(
        `insert into dataset (accession, title, description, project_id, state, licence, version, created_at, updated_at)
         select 'STPL-' || lpad(i::text, 6, '0'), 'Dataset ' || (i % 977), '', (select min(id) from project),
           case when i % 7 = 0 then 'approved' else 'draft' end, 'CC-BY-4.0', 1,
           now() - i * interval '1 minute', now() - (i % 500) * interval '1 second'
         from generate_series(1, 20000) i`,
      )
      await sql('analyze')
      const visibilities = ['', `d."state" in ('approved', 'withdrawn')`]
      for (const field of DATASET_SORT_FIELDS)
        for (const visibility of visibilities) {
          const page = pageIdsSql(
            { visibility },
            { field, descending: true },
            'walk',
            { limit: 51, offset: 0 },
            'postgresql',
          )
          const [plan] = await sql(`explain (format json) ${page.sql}`, page.params)
          // An index walked in the sort's order (the sort's own, or the accession's unique one
          // with an incremental sort of its ties), never the table read whole and sorted.
          const nodes = [...JSON.stringify(plan).matchAll(/"Node Type":"([^"]+)"/g)].map(
            (m) => m[1],
          )
          expect({
            field,
            visibility,
            walksAnIndex: nodes.some((n) => /^Index (Only )?Scan$/.test(n!)),
            readsTheTable: nodes.includes('Seq Scan'),
            sortsEverything: nodes.includes('Sort'),
          }).toEqual({
            field,
            visibility,
            walksAnIndex: true,
            readsTheTable: false,
            sortsEverything: false,
          })
        }
    } finally {
      await orm.close()
    }
  }, 60_000)
})

describe('the PostgreSQL test fixture', () => {
  it('takes the newest installed major version', () => {
    const root = join(scratch, 'postgresql')
    for (const version of ['9.6', '13', '15', '16']) {
      mkdirSync(join(root, version, 'bin'), { recursive: true })
      // A folder without the server binary (a client-only package) does not count.
      if (version !== '16') writeFileSync(join(root, version, 'bin', 'postgres'), '')
    }
    expect(postgresBinaries(root)).toBe(join(root, '15', 'bin'))
  })

  it('says what to install when PostgreSQL is missing, instead of skipping', () => {
    expect(() => postgresBinaries(join(scratch, 'nowhere'))).toThrow(
      /PostgreSQL is not installed.*Debian's `postgresql` package/s,
    )
  })
})

import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ACCESSION_PATTERN } from '@shared/domain/dataset-state'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let depositor: string
let outsider: string
let projectId: number

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const member = await buildMember(em)
  const project = await buildProject(em, [{ user: member, role: 'member' }])
  projectId = project.id
  depositor = await tokenFor(em, member)
  outsider = await tokenFor(em, await buildMember(em))
})
afterAll(() => t.close())

const create = (token: string, body: object) =>
  request(t.app).post('/api/datasets').set(bearer(token)).send(body)

describe('creating datasets', () => {
  it('creates a draft with a fresh accession and records who did it', async () => {
    const res = await create(depositor, {
      projectId,
      title: 'Nup96 dSTORM batch',
      description: 'first',
    })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      title: 'Nup96 dSTORM batch',
      state: 'draft',
      licence: 'CC-BY-4.0',
      project: { id: projectId },
    })
    expect(res.body.accession).toMatch(ACCESSION_PATTERN)
    expect(res.headers.location).toBe(`/api/datasets/${res.body.accession}`)
    const events = await t
      .em()
      .find(AuditEvent, { action: 'dataset.create', targetId: res.body.accession })
    expect(events).toHaveLength(1)
  })

  it('never hands out an accession twice, even after a deletion', async () => {
    const a = await create(depositor, { projectId, title: 'First of two' })
    await request(t.app)
      .delete(`/api/datasets/${a.body.accession}`)
      .set(bearer(depositor))
      .expect(204)
    const b = await create(depositor, { projectId, title: 'Second of two' })
    const n = (s: string) => Number(s.slice(5))
    expect(n(b.body.accession)).toBe(n(a.body.accession) + 1)
  })

  it('rejects an invalid body with field errors and writes nothing', async () => {
    const before = await t.em().count(Dataset)
    const res = await create(depositor, { projectId, title: 'ab', licence: 'NOT-A-LICENCE' })
    expect(res.status).toBe(400)
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/)
    expect(res.body.title).toBe('Invalid input')
    const pointers = res.body.errors.map((e: { pointer: string }) => e.pointer).sort()
    expect(pointers).toEqual(['#/licence', '#/title'])
    expect(
      res.body.errors.find((e: { pointer: string }) => e.pointer === '#/title').detail,
    ).toMatch(/at least 3/)
    expect(await t.em().count(Dataset)).toBe(before)
  })

  it('answers malformed JSON with a 400 problem', async () => {
    const res = await request(t.app)
      .post('/api/datasets')
      .set(bearer(depositor))
      .set('content-type', 'application/json')
      .send('{"title":')
    expect(res.status).toBe(400)
    expect(res.body.detail).toMatch(/not valid JSON/)
  })

  it('needs credentials (401) and a depositor role in the project (403)', async () => {
    const anonymous = await request(t.app)
      .post('/api/datasets')
      .send({ projectId, title: 'Nobody' })
    expect(anonymous.status).toBe(401)
    const em = t.em()
    const steward = await tokenFor(em, await buildUser(em, { siteRole: 'steward' }))
    expect((await create(steward, { projectId, title: 'Steward tries' })).status).toBe(403)
    const notVisible = await create(outsider, { projectId, title: 'Outsider tries' })
    expect(notVisible.status).toBe(400)
    expect(notVisible.body.errors[0].pointer).toBe('#/projectId')
  })
})

describe('reading, editing and deleting', () => {
  it('finds a dataset by id and by accession in any case; unknown ids are 404', async () => {
    const { body } = await create(depositor, { projectId, title: 'Look me up' })
    await request(t.app).get(`/api/datasets/${body.id}`).set(bearer(depositor)).expect(200)
    const lower = await request(t.app)
      .get(`/api/datasets/${body.accession.toLowerCase()}`)
      .set(bearer(depositor))
    expect(lower.body.id).toBe(body.id)
    const missing = await request(t.app).get('/api/datasets/STPL-999999').set(bearer(depositor))
    expect(missing.status).toBe(404)
    expect(missing.body.type).toBe('/problems/not-found')
  })

  it('hides drafts from outsiders as if they did not exist', async () => {
    const { body } = await create(depositor, { projectId, title: 'Secret draft' })
    expect(
      (await request(t.app).get(`/api/datasets/${body.accession}`).set(bearer(outsider))).status,
    ).toBe(404)
    expect((await request(t.app).get(`/api/datasets/${body.accession}`)).status).toBe(404)
  })

  it('edits a draft and validates the change', async () => {
    const { body } = await create(depositor, { projectId, title: 'Before' })
    const ok = await request(t.app)
      .patch(`/api/datasets/${body.id}`)
      .set(bearer(depositor))
      .send({ title: 'After', licence: 'CC0-1.0' })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ title: 'After', licence: 'CC0-1.0' })
    const bad = await request(t.app)
      .patch(`/api/datasets/${body.id}`)
      .set(bearer(depositor))
      .send({ proposedEmbargoUntil: '2001-01-01' })
    expect(bad.status).toBe(400)
    const unknown = await request(t.app)
      .patch(`/api/datasets/${body.id}`)
      .set(bearer(depositor))
      .send({ state: 'approved' })
    expect(unknown.status).toBe(400)
    expect((await t.em().findOneOrFail(Dataset, { id: body.id })).state).toBe('draft')
  })

  it('refuses to delete a submitted dataset', async () => {
    const em = t.em()
    const submitted = await buildDataset(em, projectId, { state: 'submitted' })
    const res = await request(t.app).delete(`/api/datasets/${submitted.id}`).set(bearer(depositor))
    expect(res.status).toBe(403)
    expect(await t.em().count(Dataset, { id: submitted.id })).toBe(1)
  })
})

describe('listing', () => {
  let listProject: number
  let token: string
  beforeAll(async () => {
    const em = t.em()
    const owner = await buildMember(em)
    listProject = (await buildProject(em, [{ user: owner, role: 'owner' }])).id
    token = await tokenFor(em, owner)
    const base = Date.UTC(2026, 0, 1)
    for (let i = 0; i < 30; i++) {
      await buildDataset(em, listProject, {
        title: `Series ${String(i).padStart(2, '0')} ${i % 3 === 0 ? 'gephyrin' : 'bassoon'}`,
        state: i % 2 ? 'submitted' : 'draft',
        createdAt: new Date(base + i * 60_000),
      })
    }
  })
  const list = (query: string) =>
    request(t.app).get(`/api/datasets?projectId=${listProject}&${query}`).set(bearer(token))

  it('pages on the server with a total', async () => {
    const first = await list('limit=10&offset=0&sort=-createdAt')
    expect(first.body.total).toBe(30)
    expect(first.body.items).toHaveLength(10)
    expect(first.body.items[0].title).toMatch(/^Series 29/)
    const last = await list('limit=10&offset=25&sort=-createdAt')
    expect(last.body.items).toHaveLength(5)
    expect(last.body.items.at(-1).title).toMatch(/^Series 00/)
  })

  it('sorts by title both ways and filters by state and text', async () => {
    const asc = await list('limit=3&sort=title')
    expect(asc.body.items.map((d: { title: string }) => d.title.slice(0, 9))).toEqual([
      'Series 00',
      'Series 01',
      'Series 02',
    ])
    const state = await list('limit=100&state=submitted')
    expect(state.body.total).toBe(15)
    expect(state.body.items.every((d: { state: string }) => d.state === 'submitted')).toBe(true)
    const text = await list('limit=100&q=GEPHYRIN')
    expect(text.body.total).toBe(10)
  })

  it('treats LIKE wildcards in the search text literally', async () => {
    expect((await list('q=%25')).body.total).toBe(0)
  })

  it('rejects bad paging values', async () => {
    const res = await list('limit=5000')
    expect(res.status).toBe(400)
    expect(res.body.errors[0].pointer).toBe('#/limit')
  })
})

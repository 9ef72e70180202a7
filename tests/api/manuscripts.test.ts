/**
 * Editors see what is theirs: a journal editor reads a dataset only once its depositor attached it
 * to a manuscript of the editor's journal; an editor of another journal, or one who lost the
 * editor role, sees nothing. Depositors create manuscripts and attach what they may share.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { User, type IUser } from '@server/modules/users/user.entity'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { buildJournal } from '../fixtures/review-builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let depositor: string
let collaboratorless: string
let editor: IUser
let editorToken: string
let otherEditorToken: string
let journalId: number
let projectId: number

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const owner = await buildMember(em)
  projectId = (await buildProject(em, [{ user: owner, role: 'owner' }])).id
  depositor = await tokenFor(em, owner)
  collaboratorless = await tokenFor(em, await buildMember(em))
  editor = await buildUser(em, { siteRole: 'editor' })
  const otherEditor = await buildUser(em, { siteRole: 'editor' })
  journalId = (await buildJournal(em, [editor])).id
  await buildJournal(em, [otherEditor])
  editorToken = await tokenFor(em, editor)
  otherEditorToken = await tokenFor(em, otherEditor)
})
afterAll(() => t.close())

const read = (accession: string, token: string) =>
  request(t.app).get(`/api/datasets/${accession}`).set(bearer(token))

describe('a journal editor', () => {
  it('no longer reads submitted datasets that are not attached to their journal', async () => {
    const dataset = await buildDataset(t.em(), projectId, { state: 'submitted' })
    expect((await read(dataset.accession, editorToken)).status).toBe(404)
    const list = await request(t.app).get('/api/datasets?limit=200').set(bearer(editorToken))
    expect(list.body.items.map((d: { id: number }) => d.id)).not.toContain(dataset.id)
  })

  it('reads, previews and downloads once the depositor attaches it to a manuscript of the journal', async () => {
    const dataset = await buildDataset(t.em(), projectId, { state: 'submitted' })
    const draft = await buildDataset(t.em(), projectId, { state: 'draft' })
    const created = await request(t.app)
      .post('/api/manuscripts')
      .set(bearer(depositor))
      .send({
        journalId,
        reference: 'NIM-2026-0412',
        title: 'Ring-shaped assemblies',
        datasets: [dataset.accession, draft.accession],
      })
    expect(created.status).toBe(201)
    expect(created.body.datasets.map((d: { accession: string }) => d.accession)).toEqual([
      dataset.accession,
      draft.accession,
    ])
    expect((await read(dataset.accession, editorToken)).status).toBe(200)
    const manifest = await request(t.app)
      .get(`/api/datasets/${dataset.accession}/manifest.txt`)
      .set(bearer(editorToken))
    expect(manifest.status).toBe(200)
    // A draft stays invisible to the journal even when attached.
    expect((await read(draft.accession, editorToken)).status).toBe(404)
    // The editor's page: the manuscript with the datasets they may read, the draft only counted.
    const mine = await request(t.app).get('/api/manuscripts').set(bearer(editorToken))
    const manuscript = mine.body.items.find(
      (m: { reference: string }) => m.reference === 'NIM-2026-0412',
    )
    expect(manuscript.datasets.map((d: { accession: string }) => d.accession)).toEqual([
      dataset.accession,
    ])
    expect(manuscript.hiddenDatasets).toBe(1)
    // An editor of another journal sees neither the data nor the manuscript.
    expect((await read(dataset.accession, otherEditorToken)).status).toBe(404)
    const theirs = await request(t.app).get('/api/manuscripts').set(bearer(otherEditorToken))
    expect(theirs.body.items).toEqual([])
    const actions = (await t.em().find(AuditEvent, { action: { $like: 'manuscript.%' } })).map(
      (e) => e.action,
    )
    expect(actions).toEqual(['manuscript.create', 'manuscript.attach', 'manuscript.attach'])
  })

  it('can make a reviewer link for an attached dataset, and not for others', async () => {
    const attached = await buildDataset(t.em(), projectId, { state: 'approved' })
    const alone = await buildDataset(t.em(), projectId, { state: 'approved' })
    const made = await request(t.app)
      .post('/api/manuscripts')
      .set(bearer(depositor))
      .send({ journalId, reference: 'NIM-2026-0500', title: 'Second', datasets: [attached.id] })
    expect(made.status).toBe(201)
    const expiresAt = new Date(Date.now() + 5 * 86_400_000).toISOString()
    const ok = await request(t.app)
      .post(`/api/datasets/${attached.accession}/reviewer-links`)
      .set(bearer(editorToken))
      .send({ expiresAt })
    expect(ok.status).toBe(201)
    const refused = await request(t.app)
      .post(`/api/datasets/${alone.accession}/reviewer-links`)
      .set(bearer(editorToken))
      .send({ expiresAt })
    // Released data is public to read, so the refusal is 403, not 404.
    expect(refused.status).toBe(403)
  })

  it('loses the access with the editor role', async () => {
    const dataset = await buildDataset(t.em(), projectId, { state: 'submitted' })
    const former = await buildUser(t.em(), { siteRole: 'editor' })
    const theirJournal = await buildJournal(t.em(), [former])
    const formerToken = await tokenFor(t.em(), former)
    await request(t.app)
      .post('/api/manuscripts')
      .set(bearer(depositor))
      .send({ journalId: theirJournal.id, reference: 'X-1', title: 'T', datasets: [dataset.id] })
      .expect(201)
    expect((await read(dataset.accession, formerToken)).status).toBe(200)
    await t.em().nativeUpdate(User, { id: former.id }, { siteRole: null })
    expect((await read(dataset.accession, formerToken)).status).toBe(404)
  })
})

describe('attaching data to a manuscript', () => {
  it('needs the share right on each dataset; nothing is written when one is refused', async () => {
    const theirs = await buildDataset(t.em(), projectId, { state: 'submitted' })
    const res = await request(t.app)
      .post('/api/manuscripts')
      .set(bearer(collaboratorless))
      .send({ journalId, reference: 'NIM-9', title: 'Not mine', datasets: [theirs.accession] })
    expect(res.status).toBe(404)
    const list = await request(t.app).get('/api/manuscripts').set(bearer(collaboratorless))
    expect(list.body.items).toEqual([])
  })

  it('refuses a second manuscript with the same number at the same journal', async () => {
    const body = { journalId, reference: 'NIM-DUP', title: 'Once' }
    await request(t.app).post('/api/manuscripts').set(bearer(depositor)).send(body).expect(201)
    const again = await request(t.app).post('/api/manuscripts').set(bearer(depositor)).send(body)
    expect(again.status).toBe(409)
  })

  it('lists the manuscripts of a dataset on its page for its depositors', async () => {
    const dataset = await buildDataset(t.em(), projectId, { state: 'submitted' })
    const made = await request(t.app)
      .post('/api/manuscripts')
      .set(bearer(depositor))
      .send({ journalId, reference: 'NIM-PAGE', title: 'Page' })
    await request(t.app)
      .post(`/api/manuscripts/${made.body.id}/datasets`)
      .set(bearer(depositor))
      .send({ dataset: dataset.accession })
      .expect(200)
    const res = await request(t.app)
      .get(`/api/datasets/${dataset.accession}/manuscripts`)
      .set(bearer(depositor))
    expect(res.body.items.map((m: { reference: string }) => m.reference)).toEqual(['NIM-PAGE'])
  })
})

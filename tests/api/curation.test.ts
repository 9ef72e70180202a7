import { readdirSync } from 'node:fs'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { DatasetMetadata } from '@server/modules/metadata/dataset-metadata.entity'
import { VersionBlob } from '@server/modules/versions/dataset-version.entity'
import { LocalStorage } from '@server/storage/local-storage'
import type { IUser } from '@server/modules/users/user.entity'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildReadyFile,
  buildShare,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let storage: LocalStorage
let depositor: IUser
let projectId: number
const tokens: Record<'depositor' | 'steward' | 'outsider' | 'collaborator', string> = {
  depositor: '',
  steward: '',
  outsider: '',
  collaborator: '',
}
let collaborator: IUser
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

beforeAll(async () => {
  // A short policy, so that a plausible embargo can exceed it.
  t = await createTestApp({ EMBARGO_MAX_YEARS: '1' })
  storage = new LocalStorage(t.config.dataDir)
  const em = t.em()
  depositor = await buildMember(em)
  collaborator = await buildUser(em)
  const steward = await buildUser(em, { siteRole: 'steward', email: 'curator@hub.test' })
  const outsider = await buildMember(em)
  projectId = (await buildProject(em, [{ user: depositor, role: 'member' }])).id
  tokens.depositor = await tokenFor(em, depositor)
  tokens.steward = await tokenFor(em, steward)
  tokens.outsider = await tokenFor(em, outsider)
  tokens.collaborator = await tokenFor(em, collaborator)
})
afterAll(() => t.close())

const as = (who: keyof typeof tokens) => ({
  get: (path: string) => request(t.app).get(path).set(bearer(tokens[who])),
  post: (path: string, body: object = {}) =>
    request(t.app).post(path).set(bearer(tokens[who])).send(body),
  patch: (path: string, body: object) =>
    request(t.app).patch(path).set(bearer(tokens[who])).send(body),
  put: (path: string, body: object) => request(t.app).put(path).set(bearer(tokens[who])).send(body),
  delete: (path: string) => request(t.app).delete(path).set(bearer(tokens[who])),
})

/** A complete draft of the depositor with one validated file whose bytes are on disk. */
async function draft(title: string, content = `table of ${title}`) {
  const em = t.em()
  const d = await buildDataset(em, projectId, { title, createdBy: depositor.id, complete: false })
  em.create(DatasetMetadata, { dataset: d.id, document: completeMetadata() })
  await em.flush()
  const file = await buildReadyFile(em, d.id, { name: 'cells.csv', content, storage })
  return { id: d.id, accession: d.accession, file }
}
const ALL_TICKED = { completeness: true, quality: true, licence: true, ethics: true, embargo: true }
const approve = (id: number, body: object = {}) =>
  as('steward').post(`/api/datasets/${id}/review`, {
    decision: 'approve',
    checklist: ALL_TICKED,
    ...body,
  })

/** Mail to the depositor whose subject matches, waiting for it (mail goes after the answer). */
async function depositorMail(subject: RegExp) {
  for (let i = 0; i < 150; i++) {
    const found = t.mail.messages.find(
      (m) => m.to.includes(depositor.email) && subject.test(m.subject),
    )
    if (found) return found
    await new Promise((r) => setTimeout(r, 20))
  }
  throw new Error(`no mail to the depositor matching ${subject}`)
}

describe('the submit gate', () => {
  it('refuses a complete description without a validated file, naming the files', async () => {
    const d = await buildDataset(t.em(), projectId, { complete: false })
    const em = t.em()
    em.create(DatasetMetadata, { dataset: d.id, document: completeMetadata() })
    em.create(DatasetFile, {
      dataset: d.id,
      name: 'still-checking.csv',
      size: 10,
      status: 'processing',
      storageKey: `${d.id}/processing`,
    })
    await em.flush()
    const res = await as('depositor').post(`/api/datasets/${d.id}/submit`)
    expect(res.status).toBe(409)
    expect(res.body.detail).toMatch(/no validated file/)
    expect(res.body.errors).toEqual([expect.objectContaining({ pointer: '#/files' })])
  })
})

describe('the steward checklist', () => {
  it('blocks approval of a human-derived sample without an ethics reference', async () => {
    const d = await draft('Human cells')
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    // Submission itself needs the reference once the sample is human-derived (completeness), so
    // the description is changed behind it here: the steward's check must still catch it.
    const em = t.em()
    const row = await em.findOneOrFail(DatasetMetadata, { dataset: d.id })
    row.document = {
      ...row.document,
      biosample: { ...row.document.biosample, organism: { name: 'Homo sapiens', taxonId: 9606 } },
    }
    await em.flush()
    const thread = await as('steward').get(`/api/datasets/${d.id}/curation`).expect(200)
    const ethics = thread.body.checks.find((c: { key: string }) => c.key === 'ethics')
    expect(ethics.outcome).toBe('fail')
    const res = await approve(d.id)
    expect(res.status).toBe(409)
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual([
      '#/checklist/completeness',
      '#/checklist/ethics',
    ])
    expect((await as('steward').get(`/api/datasets/${d.id}`)).body.state).toBe('submitted')
  })

  it('blocks a proposed embargo beyond the policy maximum, and accepts one within it', async () => {
    const d = await draft('Long embargo')
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    // A proposal made before the policy was shortened: approval would take it over as it is.
    const em = t.em()
    const row = await em.findOneOrFail(Dataset, { id: d.id })
    row.proposedEmbargoUntil = new Date(`${inDays(400)}T00:00:00Z`)
    await em.flush()
    const thread = await as('steward').get(`/api/datasets/${d.id}/curation`).expect(200)
    expect(thread.body.embargoMaxYears).toBe(1)
    const tooLong = await approve(d.id)
    expect(tooLong.status).toBe(409)
    expect(tooLong.body.errors).toEqual([
      expect.objectContaining({ pointer: '#/checklist/embargo' }),
    ])
    expect(tooLong.body.errors[0].detail).toMatch(/at most 1 year/)
    const ok = await approve(d.id, { embargoUntil: inDays(200) })
    expect(ok.status).toBe(200)
    expect(ok.body.state).toBe('approved')
  })

  it('refuses an approval with an unticked item', async () => {
    const d = await draft('Unticked')
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    const res = await approve(d.id, { checklist: { ...ALL_TICKED, licence: false } })
    expect(res.status).toBe(400)
    expect(res.body.errors[0].pointer).toBe('#/checklist/licence')
  })
})

describe('the curation thread', () => {
  let d: Awaited<ReturnType<typeof draft>>
  beforeAll(async () => {
    d = await draft('Thread sample')
    await buildShare(t.em(), d.id, projectId, collaborator, ['preview'])
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    await as('steward')
      .post(`/api/datasets/${d.id}/review`, {
        decision: 'request_changes',
        comment: 'Name the imaging buffer.',
        checklist: { completeness: true, licence: true },
      })
      .expect(200)
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    await approve(d.id, { comment: 'Thank you.' }).expect(200)
  })

  it('holds every step with the checklist and comments, for depositor and steward alike', async () => {
    for (const who of ['depositor', 'steward'] as const) {
      const res = await as(who).get(`/api/datasets/${d.accession}/curation`)
      expect(res.status).toBe(200)
      const steps = res.body.entries.map((e: { step: string }) => e.step)
      expect(steps).toEqual(['submitted', 'changes_requested', 'submitted', 'approved'])
      const sentBack = res.body.entries[1]
      expect(sentBack.comment).toBe('Name the imaging buffer.')
      expect(sentBack.checklist).toEqual({ completeness: true, licence: true })
      expect(sentBack.checks.map((c: { key: string }) => c.key)).toEqual([
        'completeness',
        'quality',
        'licence',
        'ethics',
        'embargo',
      ])
      expect(res.body.entries[3].actorName).not.toBeNull()
    }
  })

  it('does not exist for an outsider, a collaborator or the public, even once the dataset is public', async () => {
    expect((await as('outsider').get(`/api/datasets/${d.id}`)).status).toBe(200)
    expect((await as('outsider').get(`/api/datasets/${d.id}/curation`)).status).toBe(404)
    expect((await as('collaborator').get(`/api/datasets/${d.id}/curation`)).status).toBe(404)
    const anonymous = await request(t.app).get(`/api/datasets/${d.id}/curation`)
    expect(anonymous.status).toBe(404)
    expect(anonymous.headers['content-type']).toMatch(/problem\+json/)
  })

  it('tells the depositor at each step by mail', async () => {
    expect((await depositorMail(/Received for curation/)).text).toContain(d.accession)
    expect((await depositorMail(/needs changes/)).text).toContain('Name the imaging buffer.')
    const approved = await depositorMail(new RegExp(`${d.accession} was approved`))
    expect(approved.text).toContain(`${d.accession}.v1`)
    expect(approved.text).toContain('#curation')
  })
})

describe('versions', () => {
  it('freezes v1 at approval; later edits open v2 and leave v1 as it was', async () => {
    const d = await draft('Frozen sample', 'shared bytes')
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    await approve(d.id).expect(200)

    const v1 = (await as('depositor').get(`/api/datasets/${d.id}/versions/1`).expect(200)).body
    expect(v1).toMatchObject({
      number: 1,
      label: `${d.accession}.v1`,
      title: 'Frozen sample',
      doiStatus: 'pending',
      files: [{ name: 'cells.csv', size: 12, sha256: d.file.sha256 }],
    })

    // Editing an approved dataset needs a new version first.
    expect((await as('depositor').patch(`/api/datasets/${d.id}`, { title: 'Edited' })).status).toBe(
      403,
    )
    expect((await as('steward').post(`/api/datasets/${d.id}/versions`)).status).toBe(403)
    const revising = await as('depositor').post(`/api/datasets/${d.id}/versions`)
    expect(revising.status).toBe(201)
    expect(revising.body).toMatchObject({ state: 'draft', version: 2 })
    await as('depositor').patch(`/api/datasets/${d.id}`, { title: 'Edited title' }).expect(200)
    const changed = completeMetadata()
    changed.study!.keywords = ['changed after approval']
    await as('depositor').put(`/api/datasets/${d.id}/metadata`, changed).expect(200)
    // A version's record is not deleted with the draft.
    expect((await as('depositor').delete(`/api/datasets/${d.id}`)).status).toBe(409)

    const again = (await as('depositor').get(`/api/datasets/${d.id}/versions/1`)).body
    expect(again).toEqual(v1)
    expect((again.metadata as { study: { keywords: string[] } }).study.keywords).toEqual(
      completeMetadata().study!.keywords,
    )

    // v2 with the same file (plus a new one): the unchanged file is one stored blob.
    await buildReadyFile(t.em(), d.id, { name: 'extra.csv', content: 'new bytes', storage })
    await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    await approve(d.id).expect(200)
    const list = (await as('depositor').get(`/api/datasets/${d.id}/versions`)).body.items
    expect(list.map((v: { label: string }) => v.label)).toEqual([
      `${d.accession}.v2`,
      `${d.accession}.v1`,
    ])
    expect(list[0].title).toBe('Edited title')
    expect(list[0].files.map((f: { name: string }) => f.name)).toEqual(['cells.csv', 'extra.csv'])
    const blobs = await t.em().find(VersionBlob, { sha256: d.file.sha256! })
    expect(blobs).toHaveLength(1)
    const stored = readdirSync(storage.versionBlobsDir).filter((n) => n === d.file.sha256)
    expect(stored).toHaveLength(1)
  })

  it('keeps an approved version readable by the public while the next one is a draft, files only when public', async () => {
    const open = await draft('Public then revised')
    const closed = await draft('Embargoed then revised')
    for (const d of [open, closed])
      await as('depositor').post(`/api/datasets/${d.id}/submit`).expect(200)
    await approve(open.id).expect(200)
    await approve(closed.id, { embargoUntil: inDays(100) }).expect(200)
    for (const d of [open, closed])
      await as('depositor').post(`/api/datasets/${d.id}/versions`).expect(201)

    expect((await request(t.app).get(`/api/datasets/${open.id}`)).status).toBe(404)
    const openList = await request(t.app).get(`/api/datasets/${open.id}/versions`)
    expect(openList.status).toBe(200)
    expect(openList.body.items[0].files).toHaveLength(1)
    const closedOne = await request(t.app).get(`/api/datasets/${closed.id}/versions/1`)
    expect(closedOne.status).toBe(200)
    expect(closedOne.body.files).toBeNull()
    expect(closedOne.body.fileCount).toBe(1)
    // The frozen bytes stay downloadable after the draft drops its copy: public only when open.
    const frozen = openList.body.items[0].files[0]
    await as('depositor').delete(`/api/datasets/${open.id}/files/${open.file.id}`).expect(204)
    const bytes = await request(t.app).get(
      `/api/datasets/${open.id}/versions/1/files/${frozen.id}/content`,
    )
    expect(bytes.status).toBe(200)
    expect(String(bytes.body)).toBe('table of Public then revised')
    const closedFile = (await as('depositor').get(`/api/datasets/${closed.id}/versions/1`)).body
      .files[0]
    expect(
      (
        await request(t.app).get(
          `/api/datasets/${closed.id}/versions/1/files/${closedFile.id}/content`,
        )
      ).status,
    ).toBe(404)

    // A draft that was never approved has no public versions at all.
    const never = await draft('Never approved')
    expect((await request(t.app).get(`/api/datasets/${never.id}/versions`)).status).toBe(404)
    expect((await request(t.app).get(`/api/datasets/${open.id}/versions/9`)).status).toBe(404)
  })
})

describe('the steward work queue', () => {
  it('lists submissions, changes requested and embargoes ending soon; others get 403', async () => {
    const waiting = await draft('Waiting in the queue')
    await as('depositor').post(`/api/datasets/${waiting.id}/submit`).expect(200)
    const back = await draft('Sent back in the queue')
    await as('depositor').post(`/api/datasets/${back.id}/submit`).expect(200)
    await as('steward')
      .post(`/api/datasets/${back.id}/review`, { decision: 'request_changes', comment: 'More.' })
      .expect(200)
    const ending = await draft('Embargo ends soon')
    await as('depositor').post(`/api/datasets/${ending.id}/submit`).expect(200)
    await approve(ending.id, { embargoUntil: inDays(10) }).expect(200)
    const later = await draft('Embargo ends later')
    await as('depositor').post(`/api/datasets/${later.id}/submit`).expect(200)
    await approve(later.id, { embargoUntil: inDays(90) }).expect(200)

    const res = await as('steward').get('/api/curation/queue').expect(200)
    const ids = (k: string) => res.body[k].map((i: { datasetId: number }) => i.datasetId)
    expect(ids('awaitingReview')).toContain(waiting.id)
    expect(ids('awaitingReview')).not.toContain(back.id)
    expect(ids('changesRequested')).toContain(back.id)
    expect(ids('embargoEnding')).toContain(ending.id)
    expect(ids('embargoEnding')).not.toContain(later.id)
    expect((await as('depositor').get('/api/curation/queue')).status).toBe(403)
    expect((await request(t.app).get('/api/curation/queue')).status).toBe(401)
  })
})

/**
 * Reviewer links end to end: made by the owner, opened signed out through /r/:token, good for
 * view, preview and download of that one dataset only, until they expire (injected clock) or are
 * revoked; anonymous links hide the people behind the data; every use is audited; a guessed,
 * expired or revoked token gets a clear page and no data.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { DatasetMetadata } from '@server/modules/metadata/dataset-metadata.entity'
import { ReviewerLink } from '@server/modules/reviewer-links/reviewer-link.entity'
import type { IUser } from '@server/modules/users/user.entity'
import { LocalStorage } from '@server/storage/local-storage'
import {
  bearer,
  buildDataset,
  buildMember,
  buildOrganization,
  buildProject,
  buildReadyFile,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { createTestApp, type TestApp } from '../fixtures/test-app'

const DAY = 86_400_000
let now = new Date('2026-03-01T12:00:00Z')
let t: TestApp
let owner: IUser
let ownerToken: string
let memberToken: string
let projectId: number

beforeAll(async () => {
  t = await createTestApp({}, { clock: () => now })
  const em = t.em()
  const lab = await buildOrganization(em)
  owner = await buildUser(em, { name: 'Dana Depositor', organization: lab.id })
  const member = await buildMember(em)
  projectId = (
    await buildProject(em, [
      { user: owner, role: 'owner' },
      { user: member, role: 'member' },
    ])
  ).id
  ownerToken = await tokenFor(em, owner)
  memberToken = await tokenFor(em, member)
})
afterAll(() => t.close())

const inDays = (days: number) => new Date(now.getTime() + days * DAY).toISOString()

async function submitted(title = 'Nuclear pores, dSTORM') {
  return buildDataset(t.em(), projectId, { state: 'submitted', title, createdBy: owner.id })
}

async function makeLink(accession: string, body: object) {
  return request(t.app)
    .post(`/api/datasets/${accession}/reviewer-links`)
    .set(bearer(ownerToken))
    .send(body)
}

/** Opens the link as a signed-out browser; the cookie it was given, or null. */
async function open(url: string) {
  const res = await request(t.app).get(new URL(url).pathname)
  const cookie = res.headers['set-cookie']?.[0]?.split(';')[0] ?? null
  return { res, cookie }
}

describe('creating a reviewer link', () => {
  it('answers with a secret URL and its expiry; the list never shows the token', async () => {
    const dataset = await submitted()
    const res = await makeLink(dataset.accession, { expiresAt: inDays(14), anonymous: false })
    expect(res.status).toBe(201)
    expect(res.body.expiresAt).toBe(inDays(14))
    const token = new URL(res.body.url).pathname.split('/')[2]!
    expect(token).toMatch(/^rv_[A-Za-z0-9_-]{43}$/)
    const stored = await t.em().findOneOrFail(ReviewerLink, { id: res.body.id })
    expect(stored.tokenHash).not.toContain(token)
    expect(stored.tokenHash).toMatch(/^[0-9a-f]{64}$/)
    const list = await request(t.app)
      .get(`/api/datasets/${dataset.accession}/reviewer-links`)
      .set(bearer(ownerToken))
    expect(list.status).toBe(200)
    expect(list.body.items).toHaveLength(1)
    expect(JSON.stringify(list.body)).not.toContain(token)
    expect(list.body.items[0]).toMatchObject({ state: 'live', anonymous: false, demoUrl: null })
  })

  it('refuses drafts, past expiries and expiries beyond the limit, saying why', async () => {
    const draft = await buildDataset(t.em(), projectId, { state: 'draft' })
    const forDraft = await makeLink(draft.accession, { expiresAt: inDays(5) })
    expect(forDraft.status).toBe(403)
    expect(forDraft.body.detail).toMatch(/draft/)
    const dataset = await submitted()
    const past = await makeLink(dataset.accession, { expiresAt: inDays(-1) })
    expect(past.status).toBe(400)
    expect(past.body.errors[0].pointer).toBe('/expiresAt')
    const tooLong = await makeLink(dataset.accession, { expiresAt: inDays(400) })
    expect(tooLong.status).toBe(400)
    expect(tooLong.body.detail).toMatch(/at most 180 days/)
    expect(await t.em().count(ReviewerLink, { dataset: { $in: [draft.id, dataset.id] } })).toBe(0)
  })

  it('is for the project owner: a plain member is turned away', async () => {
    const dataset = await submitted()
    const res = await request(t.app)
      .post(`/api/datasets/${dataset.accession}/reviewer-links`)
      .set(bearer(memberToken))
      .send({ expiresAt: inDays(3) })
    expect(res.status).toBe(403)
  })
})

describe('opening a link signed out', () => {
  it('redirects to the dataset page and opens read, preview and download of that dataset only', async () => {
    const dataset = await submitted()
    const other = await submitted('Another submission')
    const made = await makeLink(dataset.accession, { expiresAt: inDays(7) })
    const { res, cookie } = await open(made.body.url)
    expect(res.status).toBe(303)
    expect(res.headers.location).toBe(`/datasets/${dataset.accession}?review=1`)
    expect(cookie).toMatch(/^stipple\.review=/)
    const get = (path: string) => request(t.app).get(path).set('Cookie', cookie!)
    expect((await get(`/api/datasets/${dataset.accession}`)).status).toBe(200)
    expect((await get(`/api/datasets/${dataset.accession}/manifest.txt`)).status).toBe(200)
    expect((await get(`/api/datasets/${dataset.accession}/quality`)).status).toBe(200)
    // Nothing else: another dataset, and no writing.
    expect((await get(`/api/datasets/${other.accession}`)).status).toBe(404)
    const comment = await request(t.app)
      .post(`/api/datasets/${dataset.accession}/comments`)
      .set('Cookie', cookie!)
      .set('Origin', 'http://stipple.test')
      .send({ body: 'hello' })
    expect(comment.status).toBe(401)
    // The client builds its abilities from /api/me: it learns the reviewed dataset (so the page
    // offers the download the link grants), and nothing else.
    expect((await get('/api/me')).body.reviewing).toEqual([dataset.id])
    expect((await request(t.app).get('/api/me')).body.reviewing).toEqual([])
    // Without the cookie the dataset stays hidden.
    expect((await request(t.app).get(`/api/datasets/${dataset.accession}`)).status).toBe(404)
  })

  it('audits the opening and every download through the link', async () => {
    const dataset = await submitted()
    const made = await makeLink(dataset.accession, { expiresAt: inDays(7) })
    const { cookie } = await open(made.body.url)
    await request(t.app)
      .get(`/api/datasets/${dataset.accession}/manifest.txt`)
      .set('Cookie', cookie!)
    await request(t.app)
      .get(`/api/datasets/${dataset.accession}/archive.zip`)
      .set('Cookie', cookie!)
    await new Promise((r) => setTimeout(r, 100))
    const events = await t
      .em()
      .find(
        AuditEvent,
        { targetId: dataset.accession, action: { $like: 'reviewer_link.%' } },
        { orderBy: { id: 'asc' } },
      )
    expect(events.map((e) => [e.action, e.details?.opened ?? e.details?.download])).toEqual([
      ['reviewer_link.create', undefined],
      ['reviewer_link.use', true],
      ['reviewer_link.use', 'manifest.txt'],
      ['reviewer_link.use', 'archive.zip'],
    ])
    expect(events.slice(1).every((e) => e.details?.link === made.body.id)).toBe(true)
  })

  it('stops at its expiry, by the injected clock, on the next request', async () => {
    const dataset = await submitted()
    const made = await makeLink(dataset.accession, { expiresAt: inDays(2) })
    const { cookie } = await open(made.body.url)
    const read = () =>
      request(t.app).get(`/api/datasets/${dataset.accession}`).set('Cookie', cookie!)
    const saved = now
    try {
      now = new Date(saved.getTime() + 2 * DAY - 1000)
      expect((await read()).status).toBe(200)
      now = new Date(saved.getTime() + 2 * DAY)
      expect((await read()).status).toBe(404)
      const again = await open(made.body.url)
      expect(again.res.status).toBe(410)
      expect(again.res.text).toContain('This reviewer link has expired')
      expect(again.cookie).toBeNull()
      expect(again.res.text).not.toContain(dataset.title)
    } finally {
      now = saved
    }
  })

  it('stops when revoked, and replaying the URL afterwards shows a clear page and no data', async () => {
    const dataset = await submitted('Revoked review data')
    const made = await makeLink(dataset.accession, { expiresAt: inDays(7) })
    const { cookie } = await open(made.body.url)
    const revoke = await request(t.app)
      .delete(`/api/datasets/${dataset.accession}/reviewer-links/${made.body.id}`)
      .set(bearer(ownerToken))
    expect(revoke.status).toBe(204)
    expect(
      (await request(t.app).get(`/api/datasets/${dataset.accession}`).set('Cookie', cookie!))
        .status,
    ).toBe(404)
    const replay = await open(made.body.url)
    expect(replay.res.status).toBe(410)
    expect(replay.res.text).toContain('withdrawn')
    expect(replay.res.text).not.toContain('Revoked review data')
    const revokes = await t.em().count(AuditEvent, {
      targetId: dataset.accession,
      action: 'reviewer_link.revoke',
    })
    expect(revokes).toBe(1)
  })

  it('answers a guessed or malformed token with a plain page and no cookie', async () => {
    for (const token of ['rv_' + 'A'.repeat(43), 'nonsense', 'rv_short']) {
      const res = await request(t.app).get(`/r/${token}`)
      expect(res.status).toBe(404)
      expect(res.text).toContain('This reviewer link does not work')
      expect(res.headers['set-cookie']).toBeUndefined()
    }
  })

  it('ignores a forged cookie naming a link id', async () => {
    const dataset = await submitted()
    const made = await makeLink(dataset.accession, { expiresAt: inDays(7) })
    const forged = `stipple.review=${made.body.id}~bm90LWEtcmVhbC1zaWduYXR1cmU`
    const res = await request(t.app).get(`/api/datasets/${dataset.accession}`).set('Cookie', forged)
    expect(res.status).toBe(404)
  })
})

describe('an anonymous link', () => {
  it('hides the depositor, the project, the authors, the funding and the comments', async () => {
    const dataset = await submitted()
    await request(t.app)
      .post(`/api/datasets/${dataset.accession}/comments`)
      .set(bearer(ownerToken))
      .send({ body: 'Drift corrected with fiducials' })
    const made = await makeLink(dataset.accession, { expiresAt: inDays(7), anonymous: true })
    const { cookie } = await open(made.body.url)
    const get = (path: string) =>
      request(t.app).get(`/api/datasets/${dataset.accession}${path}`).set('Cookie', cookie!)
    const record = await get('')
    expect(record.status).toBe(200)
    expect(record.body.createdBy).toBeNull()
    expect(record.body.project.name).toBe('Hidden for anonymous review')
    const metadata = await get('/metadata')
    expect(metadata.body.metadata.study.authors).toEqual([{ name: 'Author 1' }])
    expect(metadata.body.metadata.study.funding).toBeUndefined()
    expect((await get('/comments')).body.items).toEqual([])
    for (const format of ['datacite', 'jsonld', 'methods', 'ome-xml']) {
      const exported = await get(`/export/${format}`)
      expect(exported.status).toBe(200)
      for (const secret of ['Avery Tester', 'Example Lab for Nanoscopy', 'Dana Depositor'])
        expect(exported.text, `${format} leaks ${secret}`).not.toContain(secret)
    }
    // The owner, signed in, still sees everything.
    const own = await request(t.app)
      .get(`/api/datasets/${dataset.accession}/metadata`)
      .set(bearer(ownerToken))
    expect(own.body.metadata.study.authors[0].name).toBe('Avery Tester')
  })

  it('a named link shows the authors', async () => {
    const dataset = await submitted()
    const made = await makeLink(dataset.accession, { expiresAt: inDays(7), anonymous: false })
    const { cookie } = await open(made.body.url)
    const metadata = await request(t.app)
      .get(`/api/datasets/${dataset.accession}/metadata`)
      .set('Cookie', cookie!)
    expect(metadata.body.metadata.study.authors[0].name).toBe('Avery Tester')
  })
})

describe('a link to one version', () => {
  it('keeps showing the version it was made for once the next version is a draft', async () => {
    const em = t.em()
    const storage = new LocalStorage(t.config.dataDir)
    const steward = await buildUser(em, { siteRole: 'steward' })
    const stewardToken = await tokenFor(em, steward)
    const d = await buildDataset(em, projectId, {
      title: 'Synaptic vesicles, v1 under review',
      createdBy: owner.id,
      complete: false,
    })
    em.create(DatasetMetadata, { dataset: d.id, document: completeMetadata() })
    await em.flush()
    const original = await buildReadyFile(em, d.id, {
      name: 'locs.csv',
      content: 'frame,x,y\n1,10,20\n',
      storage,
    })
    const asOwner = (r: request.Test) => r.set(bearer(ownerToken))
    await asOwner(request(t.app).post(`/api/datasets/${d.id}/submit`)).expect(200)
    await request(t.app)
      .post(`/api/datasets/${d.id}/review`)
      .set(bearer(stewardToken))
      .send({
        decision: 'approve',
        checklist: {
          completeness: true,
          quality: true,
          licence: true,
          ethics: true,
          embargo: true,
        },
        embargoUntil: inDays(120).slice(0, 10),
      })
      .expect((r) => expect(r.body).toMatchObject({ state: 'approved' }))
    const made = await makeLink(d.accession, { expiresAt: inDays(30), anonymous: false })
    expect(made.status).toBe(201)

    // The depositors move on: version 2 drops the reviewed file and adds another.
    await asOwner(request(t.app).post(`/api/datasets/${d.id}/versions`)).expect(201)
    await asOwner(request(t.app).delete(`/api/datasets/${d.id}/files/${original.id}`)).expect(204)
    await buildReadyFile(t.em(), d.id, { name: 'not-reviewed.csv', content: 'new', storage })

    const { res, cookie } = await open(made.body.url)
    expect(res.status).toBe(303)
    expect(res.headers.location).toBe(`/d/${d.accession}/v/1`)
    const get = (path: string, withCookie = true) => {
      const r = request(t.app).get(path)
      return withCookie ? r.set('Cookie', cookie!) : r
    }
    const base = `/api/datasets/${d.accession}`
    // The working draft of version 2 is not what the link opened.
    expect((await get(base)).status).toBe(404)
    expect((await get(`${base}/files`)).status).toBe(404)
    const versions = await get(`${base}/versions`)
    expect(versions.body.items.map((v: { number: number }) => v.number)).toEqual([1])
    const v1 = await get(`${base}/versions/1`)
    expect(v1.body.files).toEqual([
      { id: expect.any(Number), name: 'locs.csv', size: 18, sha256: original.sha256 },
    ])
    const content = await get(`${base}/versions/1/files/${v1.body.files[0].id}/content`)
    expect(content.status).toBe(200)
    expect(String(content.body)).toBe('frame,x,y\n1,10,20\n')
    expect(content.headers['content-digest']).toBe(
      `sha-256=:${Buffer.from(original.sha256!, 'hex').toString('base64')}:`,
    )
    // Written once the response has finished: waited for, not read at once.
    await vi.waitFor(async () => {
      const used = await t.em().find(AuditEvent, {
        action: 'reviewer_link.use',
        targetId: d.accession,
      })
      expect(used.map((e) => (e.details as { download?: string }).download)).toContain(
        `${d.accession}.v1/locs.csv`,
      )
    })
    // Under embargo, the same routes without the link show no files.
    expect((await get(`${base}/versions/1`, false)).body.files).toBeNull()
    expect(
      (await get(`${base}/versions/1/files/${v1.body.files[0].id}/content`, false)).status,
    ).toBe(404)
    // The landing page of version 1 lists its files for the reviewer only, and is not cached.
    const page = await get(`/d/${d.accession}/v/1`)
    expect(page.status).toBe(200)
    expect(page.headers['cache-control']).toBe('private, no-store')
    expect(page.text).toContain(`/versions/1/files/${v1.body.files[0].id}/content`)
    expect(page.text).not.toContain('not-reviewed.csv')
    // The app shows the dataset's working draft, which the link does not open: no button to it.
    expect(page.text).not.toContain('Open in Stipple')
    const publicPage = await get(`/d/${d.accession}/v/1`, false)
    expect(publicPage.text).not.toContain('locs.csv')
    expect(publicPage.text).toContain('under embargo')
  })
})

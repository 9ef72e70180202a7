import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { Dataset, DatasetShare } from '@server/modules/datasets/dataset.entity'
import { Membership } from '@server/modules/projects/project.entity'
import type { IUser } from '@server/modules/users/user.entity'
import {
  bearer,
  buildMember,
  buildProject,
  buildReadyFile,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { createTestApp, mailTo, type TestApp } from '../fixtures/test-app'

let t: TestApp
let depositor: IUser
let depositorToken: string
let stewardToken: string
let steward: IUser
let projectId: number
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  depositor = await buildMember(em)
  steward = await buildUser(em, { siteRole: 'steward', email: 'steward@hub.test' })
  projectId = (await buildProject(em, [{ user: depositor, role: 'member' }])).id
  depositorToken = await tokenFor(em, depositor)
  stewardToken = await tokenFor(em, steward)
})
afterAll(() => t.close())

/** A draft with a complete description, ready to submit. */
async function draft(title = 'Lifecycle sample') {
  const res = await request(t.app)
    .post('/api/datasets')
    .set(bearer(depositorToken))
    .send({ projectId, title, description: 'A dataset going through curation' })
  await request(t.app)
    .put(`/api/datasets/${res.body.id}/metadata`)
    .set(bearer(depositorToken))
    .send(completeMetadata())
    .expect(200)
  await buildReadyFile(t.em(), res.body.id)
  return res.body as { id: number; accession: string }
}
const submit = (id: number) =>
  request(t.app).post(`/api/datasets/${id}/submit`).set(bearer(depositorToken))
const review = (id: number, body: object) =>
  request(t.app).post(`/api/datasets/${id}/review`).set(bearer(stewardToken)).send(body)

describe('a dataset from draft to release', () => {
  it('cannot be submitted while required fields are missing, and says which', async () => {
    const bare = await request(t.app)
      .post('/api/datasets')
      .set(bearer(depositorToken))
      .send({ projectId, title: 'Bare draft' })
    const res = await submit(bare.body.id)
    expect(res.status).toBe(409)
    expect(res.body.detail).toMatch(/required fields? missing/)
    const pointers = res.body.errors.map((e: { pointer: string }) => e.pointer)
    expect(pointers).toEqual(
      expect.arrayContaining([
        '#/description',
        '#/instrument/objective/lensNA',
        '#/acquisition/technique',
      ]),
    )
    expect((await t.em().findOneOrFail(Dataset, { id: bare.body.id })).state).toBe('draft')
  })

  it('is submitted by the depositor, and the stewards are told by mail', async () => {
    const d = await draft('Submitted for review')
    const res = await submit(d.id)
    expect(res.status).toBe(200)
    expect(res.body.state).toBe('submitted')
    expect(res.body.submittedAt).not.toBeNull()
    const mail = await mailTo(t.mail, 'steward@hub.test')
    expect(mail.subject).toContain(d.accession)
  })

  it('goes back for changes with the steward comment, then can be resubmitted', async () => {
    const d = await draft('Needs a buffer description')
    await submit(d.id)
    const noReason = await review(d.id, { decision: 'request_changes' })
    expect(noReason.status).toBe(400)
    expect(noReason.body.errors[0].pointer).toBe('#/comment')
    const back = await review(d.id, {
      decision: 'request_changes',
      comment: 'Say which imaging buffer was used.',
    })
    expect(back.body.state).toBe('changes_requested')
    const mail = await mailTo(t.mail, depositor.email)
    expect(mail.text).toContain('imaging buffer')
    expect((await submit(d.id)).body.state).toBe('submitted')
  })

  it('is approved under embargo; the embargo date is taken from the proposal', async () => {
    const d = await draft('Embargoed until publication')
    await request(t.app)
      .patch(`/api/datasets/${d.id}`)
      .set(bearer(depositorToken))
      .send({ proposedEmbargoUntil: inDays(120) })
      .expect(200)
    await submit(d.id)
    const res = await review(d.id, { decision: 'approve' })
    expect(res.body).toMatchObject({ state: 'approved', embargoUntil: inDays(120) })
    const anonymous = await request(t.app).get(`/api/datasets/${d.id}`)
    expect(anonymous.status).toBe(200)
    expect((await request(t.app).get(`/api/datasets/${d.id}/manifest.txt`)).status).toBe(403)
  })

  it('refuses decisions that do not fit the state (409) and past embargo dates (400)', async () => {
    const d = await draft('Wrong order')
    await submit(d.id)
    expect((await review(d.id, { decision: 'withdraw', comment: 'x' })).status).toBe(409)
    expect((await review(d.id, { decision: 'approve', embargoUntil: '2020-01-01' })).status).toBe(
      400,
    )
    expect((await t.em().findOneOrFail(Dataset, { id: d.id })).state).toBe('submitted')
  })

  it('has its embargo extended and lifted by a steward, each time with a reason in the audit log', async () => {
    const d = await draft('Embargo changes')
    await submit(d.id)
    await review(d.id, { decision: 'approve', embargoUntil: inDays(30) })
    const noReason = await request(t.app)
      .put(`/api/datasets/${d.id}/embargo`)
      .set(bearer(stewardToken))
      .send({ until: inDays(60) })
    expect(noReason.status).toBe(400)
    const extended = await request(t.app)
      .put(`/api/datasets/${d.id}/embargo`)
      .set(bearer(stewardToken))
      .send({ until: inDays(60), reason: 'Publication delayed' })
    expect(extended.body.embargoUntil).toBe(inDays(60))
    const lifted = await request(t.app)
      .put(`/api/datasets/${d.id}/embargo`)
      .set(bearer(stewardToken))
      .send({ until: null, reason: 'Article published' })
    expect(lifted.body.embargoUntil).toBeNull()
    expect((await request(t.app).get(`/api/datasets/${d.id}/manifest.txt`)).status).toBe(200)
    const events = await t
      .em()
      .find(
        AuditEvent,
        { action: 'dataset.embargo', targetId: d.accession },
        { orderBy: { id: 'asc' } },
      )
    expect(events.map((e) => e.details?.reason)).toEqual([
      'Publication delayed',
      'Article published',
    ])
    const audit = await request(t.app)
      .get(`/api/audit?targetId=${d.accession}`)
      .set(bearer(stewardToken))
    expect(audit.body.items.map((e: { action: string }) => e.action)).toContain('dataset.approve')
    expect((await request(t.app).get('/api/audit').set(bearer(depositorToken))).status).toBe(403)
  })

  it('is withdrawn and keeps a tombstone that anyone can read', async () => {
    const d = await draft('To be withdrawn')
    await submit(d.id)
    await review(d.id, { decision: 'approve' })
    const res = await review(d.id, { decision: 'withdraw', comment: 'Faulty drift correction' })
    expect(res.body.state).toBe('withdrawn')
    expect((await request(t.app).get(`/api/datasets/${d.id}`)).status).toBe(200)
    expect((await request(t.app).get(`/api/datasets/${d.id}/comments`)).status).toBe(403)
  })
})

describe('sharing with an external collaborator', () => {
  it('invites by e-mail, adds them as collaborator and sends them a message', async () => {
    const d = await draft('Shared with a guest')
    const res = await request(t.app)
      .post(`/api/datasets/${d.id}/shares`)
      .set(bearer(depositorToken))
      .send({
        email: 'guest@partner.test',
        capabilities: ['preview', 'annotate', 'preview'],
        message: 'Please look at the ring region.',
      })
    expect(res.status).toBe(201)
    expect(res.body.capabilities).toEqual(['preview', 'annotate'])
    const membership = await t
      .em()
      .findOneOrFail(Membership, { project: projectId, user: res.body.userId })
    expect(membership.role).toBe('collaborator')
    const mail = await mailTo(t.mail, 'guest@partner.test')
    expect(mail.subject).toContain(d.accession)
    expect(mail.text).toContain('ring region')
    expect(mail.text).toContain(`/datasets/${d.accession}`)
  })

  it('an address nobody has signed in with gets an invitation, not a share that claims an account', async () => {
    const d = await draft('Shared with a newcomer')
    const res = await request(t.app)
      .post(`/api/datasets/${d.id}/shares`)
      .set(bearer(depositorToken))
      .send({ email: 'newcomer@faraway.test', capabilities: ['preview'] })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ invitationOpen: true, name: '' })
    const mail = await mailTo(t.mail, 'newcomer@faraway.test')
    expect(mail.subject).toMatch(/invites you/)
    expect(mail.text).toMatch(/no Stipple account yet/)
    expect(mail.text).toMatch(/Sign in once with this address/)

    // Someone who has signed in before gets the plain notice, and is shown by name.
    const em = t.em()
    const known = await buildUser(em, { email: 'known@partner.test', name: 'Known Person' })
    known.subject = 'idp-known'
    known.lastSignInAt = new Date()
    await em.flush()
    const shared = await request(t.app)
      .post(`/api/datasets/${d.id}/shares`)
      .set(bearer(depositorToken))
      .send({ email: 'known@partner.test', capabilities: ['preview'] })
    expect(shared.body).toMatchObject({ invitationOpen: false, name: 'Known Person' })
    const notice = await mailTo(t.mail, 'known@partner.test')
    expect(notice.subject).toMatch(/shared .* with you/)
    expect(notice.text).not.toMatch(/no Stipple account/)
  })

  it('lets the collaborator see only what was shared', async () => {
    const em = t.em()
    const guest = await buildUser(em, { email: 'guest2@partner.test' })
    const token = await tokenFor(em, guest)
    const owner = await buildMember(em)
    const ownerToken = await tokenFor(em, owner)
    const separate = (await buildProject(em, [{ user: owner, role: 'owner' }])).id
    const make = (title: string) =>
      request(t.app)
        .post('/api/datasets')
        .set(bearer(ownerToken))
        .send({ projectId: separate, title })
    const shared = (await make('Visible to guest 2')).body
    await make('Not visible to guest 2')
    await request(t.app)
      .post(`/api/datasets/${shared.id}/shares`)
      .set(bearer(ownerToken))
      .send({ email: guest.email, capabilities: ['preview'] })
      .expect(201)
    const list = await request(t.app)
      .get(`/api/datasets?projectId=${separate}&limit=200`)
      .set(bearer(token))
    expect(list.body.items.map((i: { id: number }) => i.id)).toEqual([shared.id])
    const projects = await request(t.app).get('/api/projects').set(bearer(token))
    expect(projects.body.items).toHaveLength(1)
    expect(projects.body.items[0]).toMatchObject({
      id: separate,
      myRole: 'collaborator',
      datasetCount: 1,
    })
    const comment = await request(t.app)
      .post(`/api/datasets/${shared.id}/comments`)
      .set(bearer(token))
      .send({ body: 'Nice' })
    expect(comment.status).toBe(403)
  })

  it('refuses to share with someone already in the project', async () => {
    const d = await draft('Already a member')
    const res = await request(t.app)
      .post(`/api/datasets/${d.id}/shares`)
      .set(bearer(depositorToken))
      .send({ email: depositor.email })
    expect(res.status).toBe(409)
  })

  it('stops sharing', async () => {
    const d = await draft('Share then revoke')
    const share = await request(t.app)
      .post(`/api/datasets/${d.id}/shares`)
      .set(bearer(depositorToken))
      .send({ email: 'brief@partner.test' })
    await request(t.app)
      .delete(`/api/datasets/${d.id}/shares/${share.body.id}`)
      .set(bearer(depositorToken))
      .expect(204)
    expect(await t.em().count(DatasetShare, { dataset: d.id })).toBe(0)
    expect(
      (await request(t.app).get(`/api/datasets/${d.id}/shares`).set(bearer(depositorToken))).body
        .items,
    ).toEqual([])
  })
})

describe('threads on a dataset', () => {
  it('opens a thread, takes a reply, and refuses a reply to an unknown thread or region', async () => {
    const d = await draft('Discussed dataset')
    const post = (body: object) =>
      request(t.app).post(`/api/datasets/${d.id}/comments`).set(bearer(depositorToken)).send(body)
    const ok = await post({ body: 'Two rings overlap here' })
    expect(ok.status).toBe(201)
    expect(ok.body.regionId).toBeNull()
    const reply = await post({ body: 'Agreed', replyTo: ok.body.id })
    expect(reply.body.replyTo).toBe(ok.body.id)
    const badReply = await post({ body: 'Lost', replyTo: 999_999 })
    expect(badReply.status).toBe(400)
    expect(badReply.body.errors[0].pointer).toBe('#/replyTo')
    const badRegion = await post({ body: 'Where?', regionId: 999_999 })
    expect(badRegion.status).toBe(400)
    expect(badRegion.body.errors[0].pointer).toBe('#/regionId')
    const list = await request(t.app)
      .get(`/api/datasets/${d.id}/comments`)
      .set(bearer(depositorToken))
    expect(list.body.items).toHaveLength(2)
  })
})

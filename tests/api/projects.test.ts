import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Membership, Project } from '@server/modules/projects/project.entity'
import { User } from '@server/modules/users/user.entity'
import { bearer, buildMember, buildProject, buildUser, tokenFor } from '../fixtures/builders'
import { createTestApp, mailTo, type TestApp } from '../fixtures/test-app'

let t: TestApp
let lead: string
beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  lead = await tokenFor(em, await buildMember(em))
})
afterAll(() => t.close())

describe('projects', () => {
  it('makes the creator the owner', async () => {
    const res = await request(t.app)
      .post('/api/projects')
      .set(bearer(lead))
      .send({ name: 'Centriole ninefold survey', description: 'dSTORM of centriole proteins' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      name: 'Centriole ninefold survey',
      myRole: 'owner',
      datasetCount: 0,
    })
    const detail = await request(t.app).get(`/api/projects/${res.body.id}`).set(bearer(lead))
    expect(detail.body.members).toHaveLength(1)
    expect(detail.body.members[0].role).toBe('owner')
  })

  it('refuses a duplicate name with 409 and a short name with 400', async () => {
    await request(t.app)
      .post('/api/projects')
      .set(bearer(lead))
      .send({ name: 'Duplicated name' })
      .expect(201)
    const dup = await request(t.app)
      .post('/api/projects')
      .set(bearer(lead))
      .send({ name: 'Duplicated name' })
    expect(dup.status).toBe(409)
    const short = await request(t.app).post('/api/projects').set(bearer(lead)).send({ name: 'ab' })
    expect(short.status).toBe(400)
    expect(short.body.errors[0]).toMatchObject({ pointer: '#/name' })
  })

  it('lets only consortium members create projects', async () => {
    const em = t.em()
    const external = await tokenFor(em, await buildUser(em, { organization: null }))
    const res = await request(t.app)
      .post('/api/projects')
      .set(bearer(external))
      .send({ name: 'External attempt' })
    expect(res.status).toBe(403)
    expect(await t.em().count(Project, { name: 'External attempt' })).toBe(0)
  })

  it('lists only the projects a person belongs to (narrowed in the database)', async () => {
    const em = t.em()
    const a = await buildMember(em)
    const mine = await buildProject(em, [{ user: a, role: 'member' }])
    await buildProject(em, [{ user: await buildMember(em), role: 'owner' }])
    const res = await request(t.app)
      .get('/api/projects')
      .set(bearer(await tokenFor(em, a)))
    expect(res.body.items.map((p: { id: number }) => p.id)).toEqual([mine.id])
  })
})

describe('members', () => {
  it('adds a member by e-mail, inviting people who never signed in, and tells them by mail', async () => {
    const created = await request(t.app)
      .post('/api/projects')
      .set(bearer(lead))
      .send({ name: 'Actin cortex nanoscopy' })
    const res = await request(t.app)
      .post(`/api/projects/${created.body.id}/members`)
      .set(bearer(lead))
      .send({ email: ' New.Person@Lab.test ', role: 'member' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ email: 'new.person@lab.test', role: 'member' })
    const invited = await t.em().findOneOrFail(User, { email: 'new.person@lab.test' })
    expect(invited.subject).toBeNull()
    const mail = await mailTo(t.mail, 'new.person@lab.test')
    expect(mail.subject).toContain('Actin cortex nanoscopy')
  })

  it('only owners manage members', async () => {
    const em = t.em()
    const owner = await buildMember(em)
    const member = await buildMember(em)
    const project = await buildProject(em, [
      { user: owner, role: 'owner' },
      { user: member, role: 'member' },
    ])
    const res = await request(t.app)
      .post(`/api/projects/${project.id}/members`)
      .set(bearer(await tokenFor(em, member)))
      .send({ email: 'x@lab.test', role: 'member' })
    expect(res.status).toBe(403)
    const stranger = await request(t.app)
      .post(`/api/projects/${project.id}/members`)
      .set(bearer(lead))
      .send({ email: 'x@lab.test', role: 'member' })
    expect(stranger.status).toBe(404)
  })

  it('validates the role and keeps at least one owner', async () => {
    const em = t.em()
    const owner = await buildMember(em)
    const project = await buildProject(em, [{ user: owner, role: 'owner' }])
    const token = await tokenFor(em, owner)
    const bad = await request(t.app)
      .post(`/api/projects/${project.id}/members`)
      .set(bearer(token))
      .send({ email: 'y@lab.test', role: 'boss' })
    expect(bad.status).toBe(400)
    expect(bad.body.errors[0].pointer).toBe('#/role')
    const demote = await request(t.app)
      .post(`/api/projects/${project.id}/members`)
      .set(bearer(token))
      .send({ email: owner.email, role: 'member' })
    expect(demote.status).toBe(409)
    expect(
      (await t.em().findOneOrFail(Membership, { project: project.id, user: owner.id })).role,
    ).toBe('owner')
  })

  it('unknown projects are 404', async () => {
    expect((await request(t.app).get('/api/projects/99999').set(bearer(lead))).status).toBe(404)
    expect((await request(t.app).get('/api/projects/abc').set(bearer(lead))).status).toBe(400)
  })
})

/**
 * The admin's users page: only admins list, search, set site roles and deactivate; each change is
 * audited; a deactivated person's tokens stop working at once.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import type { IUser } from '@server/modules/users/user.entity'
import { bearer, buildMember, buildUser, tokenFor } from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let admin: IUser
let adminToken: string
let stewardToken: string
beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  admin = await buildUser(em, { siteRole: 'admin', name: 'Admin Person' })
  adminToken = await tokenFor(em, admin)
  stewardToken = await tokenFor(em, await buildUser(em, { siteRole: 'steward' }))
})
afterAll(() => t.close())

describe('the users list', () => {
  it('is for admins only and searches names and e-mails literally', async () => {
    await buildUser(t.em(), { name: 'Grace Hopper', email: 'grace@navy.test' })
    await buildUser(t.em(), { name: 'Percent 100% Person', email: 'pct@lab.test' })
    const list = (search: string, token = adminToken) =>
      request(t.app).get('/api/users').query({ search }).set(bearer(token))
    expect((await list('GRACE')).body.items.map((u: { email: string }) => u.email)).toEqual([
      'grace@navy.test',
    ])
    expect((await list('navy.test')).body.total).toBe(1)
    expect((await list('100%')).body.items.map((u: { name: string }) => u.name)).toEqual([
      'Percent 100% Person',
    ])
    expect((await list('%')).body.total).toBe(1)
    expect((await list('', stewardToken)).status).toBe(403)
    expect((await request(t.app).get('/api/users')).status).toBe(401)
  })
})

describe('site roles', () => {
  it('sets and clears a role, audited with from and to; refuses nonsense and self-demotion', async () => {
    const person = await buildMember(t.em())
    const set = (id: number, siteRole: unknown, token = adminToken) =>
      request(t.app).put(`/api/users/${id}/site-role`).set(bearer(token)).send({ siteRole })
    expect((await set(person.id, 'steward')).body.siteRole).toBe('steward')
    expect((await set(person.id, null)).body.siteRole).toBeNull()
    const bad = await set(person.id, 'superuser')
    expect(bad.status).toBe(400)
    expect(bad.headers['content-type']).toContain('application/problem+json')
    expect((await set(admin.id, null)).status).toBe(409)
    expect((await set(person.id, 'admin', stewardToken)).status).toBe(403)
    expect((await set(999_999, 'editor')).status).toBe(404)
    const events = await t
      .em()
      .find(
        AuditEvent,
        { action: 'user.role', targetId: String(person.id) },
        { orderBy: { id: 'asc' } },
      )
    expect(events.map((e) => [e.actor, e.details])).toEqual([
      [admin.id, { from: 'none', to: 'steward' }],
      [admin.id, { from: 'steward', to: 'none' }],
    ])
  })
})

describe('deactivation', () => {
  it('stops the person’s tokens at once, is audited, and can be undone', async () => {
    const person = await buildMember(t.em())
    const token = await tokenFor(t.em(), person)
    const me = () => request(t.app).get('/api/datasets').set(bearer(token))
    expect((await me()).status).toBe(200)

    const off = await request(t.app)
      .put(`/api/users/${person.id}/active`)
      .set(bearer(adminToken))
      .send({ active: false, reason: 'Left the consortium' })
    expect(off.status).toBe(200)
    expect(off.body.deactivatedAt).not.toBeNull()
    const refused = await me()
    expect(refused.status).toBe(401)
    expect(refused.headers['content-type']).toContain('application/problem+json')

    await request(t.app)
      .put(`/api/users/${person.id}/active`)
      .set(bearer(adminToken))
      .send({ active: true })
      .expect(200)
    expect((await me()).status).toBe(200)

    const actions = (
      await t.em().find(AuditEvent, { targetType: 'User', targetId: String(person.id) })
    ).map((e) => [e.action, e.details])
    expect(actions).toEqual([
      ['user.deactivate', { reason: 'Left the consortium' }],
      ['user.reactivate', null],
    ])
  })

  it('refuses an admin deactivating themselves', async () => {
    const res = await request(t.app)
      .put(`/api/users/${admin.id}/active`)
      .set(bearer(adminToken))
      .send({ active: false })
    expect(res.status).toBe(409)
  })
})

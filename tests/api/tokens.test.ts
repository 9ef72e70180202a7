import request from 'supertest'
import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { ApiToken } from '@server/modules/tokens/api-token.entity'
import { bearer, buildMember, tokenFor } from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let token: string
beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  token = await tokenFor(em, await buildMember(em))
})
afterAll(() => t.close())

describe('personal access tokens', () => {
  it('authenticates API calls with Authorization: Bearer', async () => {
    const res = await request(t.app).get('/api/me').set(bearer(token))
    expect(res.body.user).not.toBeNull()
    expect(res.body.viewer.id).toBe(res.body.user.id)
  })

  it('shows a new secret once and stores only its SHA-256', async () => {
    const res = await request(t.app)
      .post('/api/me/tokens')
      .set(bearer(token))
      .send({ name: 'Acquisition PC 2', expiresInDays: 90 })
    expect(res.status).toBe(201)
    const secret: string = res.body.token
    expect(secret).toMatch(/^stp_[A-Za-z0-9_-]{43}$/)
    const row = await t.em().findOneOrFail(ApiToken, { id: res.body.id })
    expect(row.tokenHash).toBe(createHash('sha256').update(secret).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(secret)
    const list = await request(t.app).get('/api/me/tokens').set(bearer(token))
    expect(list.body.items.map((i: { name: string }) => i.name)).toContain('Acquisition PC 2')
    expect(JSON.stringify(list.body)).not.toContain(secret)
    expect((await request(t.app).get('/api/me').set(bearer(secret))).body.user).not.toBeNull()
  })

  it('stops accepting a revoked token', async () => {
    const created = await request(t.app)
      .post('/api/me/tokens')
      .set(bearer(token))
      .send({ name: 'Short-lived', expiresInDays: 1 })
    await request(t.app).delete(`/api/me/tokens/${created.body.id}`).set(bearer(token)).expect(204)
    const res = await request(t.app).get('/api/me').set(bearer(created.body.token))
    expect(res.status).toBe(401)
    expect(res.body.detail).toMatch(/unknown, revoked or expired/)
  })

  it('stops accepting an expired token', async () => {
    const created = await request(t.app)
      .post('/api/me/tokens')
      .set(bearer(token))
      .send({ name: 'Expiring', expiresInDays: 1 })
    const em = t.em()
    await em.nativeUpdate(
      ApiToken,
      { id: created.body.id },
      { expiresAt: new Date(Date.now() - 1000) },
    )
    expect((await request(t.app).get('/api/me').set(bearer(created.body.token))).status).toBe(401)
  })

  it('stops accepting a token the moment it expires, though its identity is cached', async () => {
    const created = await request(t.app)
      .post('/api/me/tokens')
      .set(bearer(token))
      .send({ name: 'Cached', expiresInDays: 1 })
    expect((await request(t.app).get('/api/me').set(bearer(created.body.token))).status).toBe(200)
    // Nothing in the database changes: only the clock passes the expiry.
    vi.useFakeTimers({ toFake: ['Date'], now: Date.now() + 2 * 86_400_000 })
    try {
      const res = await request(t.app).get('/api/me').set(bearer(created.body.token))
      expect(res.status).toBe(401)
      expect(res.body.detail).toMatch(/unknown, revoked or expired/)
    } finally {
      vi.useRealTimers()
    }
  })

  it('answers a malformed Authorization header with 401', async () => {
    const res = await request(t.app).get('/api/datasets').set('Authorization', 'Basic dXNlcjpwYXNz')
    expect(res.status).toBe(401)
    expect(res.body.title).toBe('Not signed in')
  })

  it("cannot revoke someone else's token", async () => {
    const em = t.em()
    const other = await buildMember(em)
    const theirs = await request(t.app)
      .post('/api/me/tokens')
      .set(bearer(await tokenFor(em, other)))
      .send({ name: 'Theirs', expiresInDays: 5 })
    expect(
      (await request(t.app).delete(`/api/me/tokens/${theirs.body.id}`).set(bearer(token))).status,
    ).toBe(404)
  })

  it('validates the token form', async () => {
    const res = await request(t.app)
      .post('/api/me/tokens')
      .set(bearer(token))
      .send({ name: '', expiresInDays: 0 })
    expect(res.status).toBe(400)
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer).sort()).toEqual([
      '#/expiresInDays',
      '#/name',
    ])
  })

  it('needs a signed-in user', async () => {
    expect((await request(t.app).get('/api/me/tokens')).status).toBe(401)
    expect((await request(t.app).get('/api/me')).body).toMatchObject({ user: null, viewer: null })
  })
})

/**
 * Caches of identities, totals and pages are only valid for one access version, which SQLite
 * raises in the same transaction as every relevant change. Two app instances on one database file
 * stand in for two server processes: a change made through one must show in the other at once.
 */
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createApp } from '@server/app'
import { openDatabase, type Orm } from '@server/db'
import { createLogger } from '@server/logger'
import { createRelyingParty } from '@server/modules/auth/relying-party'
import { readAccessVersion } from '@server/modules/common/access-version'
import { bearer, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { TEST_ORIGIN, testConfig } from '../fixtures/test-app'

const dir = mkdtempSync(join(tmpdir(), 'stipple-version-'))
const orms: Orm[] = []
async function instance() {
  const orm = await openDatabase(join(dir, 'shared.sqlite'))
  orms.push(orm)
  const app = createApp({
    orm,
    config: testConfig(),
    logger: createLogger('silent'),
    mailer: { send: async () => undefined },
    relyingParty: createRelyingParty({
      issuer: 'http://127.0.0.1:9/oidc',
      clientId: 'x',
      clientSecret: 'y',
      publicUrl: TEST_ORIGIN,
    }),
  })
  return { app, orm }
}

let a: Awaited<ReturnType<typeof instance>>
let b: Awaited<ReturnType<typeof instance>>
let owner: string
let projectId: number
beforeAll(async () => {
  a = await instance()
  b = await instance()
  const em = a.orm.em.fork()
  const user = await buildMember(em)
  projectId = (await buildProject(em, [{ user, role: 'owner' }])).id
  owner = await tokenFor(em, user)
})
afterAll(async () => {
  for (const orm of orms) await orm.close()
  rmSync(dir, { recursive: true, force: true })
})

const list = (app: typeof a.app, token: string) =>
  request(app).get(`/api/datasets?projectId=${projectId}`).set(bearer(token))

describe('the access version', () => {
  it('is raised by the database on every access-relevant write', async () => {
    const before = await readAccessVersion(a.orm.em.fork())
    await request(b.app)
      .post('/api/datasets')
      .set(bearer(owner))
      .send({ projectId, title: 'Raises the version' })
      .expect(201)
    expect(await readAccessVersion(a.orm.em.fork())).toBeGreaterThan(before)
  })

  it('keeps lists exact across processes: a dataset created in one appears in the other at once', async () => {
    const first = await list(a.app, owner)
    await request(b.app)
      .post('/api/datasets')
      .set(bearer(owner))
      .send({ projectId, title: 'Created elsewhere' })
      .expect(201)
    const second = await list(a.app, owner)
    expect(second.body.total).toBe(first.body.total + 1)
    expect(second.body.items[0].title).toBe('Created elsewhere')
  })

  it('drops a revoked token everywhere on the next request', async () => {
    const created = await request(a.app)
      .post('/api/me/tokens')
      .set(bearer(owner))
      .send({ name: 'Revoke me', expiresInDays: 5 })
    const secret = created.body.token as string
    expect((await request(a.app).get('/api/me').set(bearer(secret))).status).toBe(200)
    await request(b.app).delete(`/api/me/tokens/${created.body.id}`).set(bearer(owner)).expect(204)
    expect((await request(a.app).get('/api/me').set(bearer(secret))).status).toBe(401)
  })

  it('shows a new member the project datasets as soon as they are added', async () => {
    const em = a.orm.em.fork()
    const newcomer = await buildMember(em)
    const token = await tokenFor(em, newcomer)
    await request(b.app)
      .post('/api/datasets')
      .set(bearer(owner))
      .send({ projectId, title: 'Draft for the newcomer' })
      .expect(201)
    expect((await list(a.app, token)).body.total).toBe(0)
    await request(b.app)
      .post(`/api/projects/${projectId}/members`)
      .set(bearer(owner))
      .send({ email: newcomer.email, role: 'member' })
      .expect(201)
    expect((await list(a.app, token)).body.total).toBeGreaterThan(0)
  })

  it('does not raise the version when a token is merely used', async () => {
    const before = await readAccessVersion(a.orm.em.fork())
    await request(a.app).get('/api/me').set(bearer(owner)).expect(200)
    expect(await readAccessVersion(a.orm.em.fork())).toBe(before)
  })
})

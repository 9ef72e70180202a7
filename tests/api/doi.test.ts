import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createLogger } from '@server/logger'
import { publishDoi } from '@server/modules/doi/datacite-client'
import { DOI_MAX_ATTEMPTS, DoiRegistrar } from '@server/modules/doi/doi-registrar'
import {
  startFakeDataCite,
  type FakeDataCite,
} from '@server/modules/doi/fake-datacite/fake-datacite'
import { createMailer } from '@server/modules/mail/mailer'
import { DatasetVersion } from '@server/modules/versions/dataset-version.entity'
import type { IUser } from '@server/modules/users/user.entity'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildReadyFile,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { createTestApp, mailTo, type TestApp } from '../fixtures/test-app'

const REPOSITORY = { repositoryId: 'TEST.STIPPLE', password: 'fake-secret', prefix: '10.5072' }

let t: TestApp
let fake: FakeDataCite
let depositor: IUser
let stewardToken: string
let depositorToken: string
let projectId: number
/** The registrar's clock, moved by hand. */
let now = new Date('2026-03-01T12:00:00Z')
let registrar: DoiRegistrar

beforeAll(async () => {
  fake = await startFakeDataCite(REPOSITORY)
  t = await createTestApp({
    DATACITE_URL: fake.url,
    DATACITE_REPOSITORY_ID: REPOSITORY.repositoryId,
    DATACITE_PASSWORD: REPOSITORY.password,
    DOI_PREFIX: REPOSITORY.prefix,
  })
  registrar = new DoiRegistrar({
    orm: t.orm,
    config: t.config,
    logger: createLogger('silent'),
    mailer: createMailer(t.mail.url, t.config.mailFrom, createLogger('silent')),
    url: fake.url,
    clock: () => now,
  })
  const em = t.em()
  depositor = await buildMember(em)
  projectId = (await buildProject(em, [{ user: depositor, role: 'member' }])).id
  stewardToken = await tokenFor(em, await buildUser(em, { siteRole: 'steward' }))
  depositorToken = await tokenFor(em, depositor)
})
afterAll(async () => {
  await t.close()
  await fake.stop()
})

/** A dataset approved through the API: its v1 waits for its DOI. */
async function approved(title: string) {
  const d = await buildDataset(t.em(), projectId, { title, createdBy: depositor.id })
  await buildReadyFile(t.em(), d.id)
  await request(t.app).post(`/api/datasets/${d.id}/submit`).set(bearer(depositorToken)).expect(200)
  await request(t.app)
    .post(`/api/datasets/${d.id}/review`)
    .set(bearer(stewardToken))
    .send({ decision: 'approve' })
    .expect(200)
  // Due from the approval's own (wall) time; the registrar's clock is set past it.
  now = new Date(Date.now() + 1000)
  return d
}
const versionOf = (datasetId: number) =>
  t.em().findOneOrFail(DatasetVersion, { dataset: datasetId, number: 1 })

describe('DOI registration with DataCite (local stand-in)', () => {
  it('registers a findable DOI from the DataCite export of the frozen version', async () => {
    const d = await approved('Citable sample')
    expect(await registrar.runDue()).toBe(1)
    const v = await versionOf(d.id)
    const doi = `10.5072/${d.accession.toLowerCase()}.v1`
    expect(v).toMatchObject({ doiStatus: 'registered', doi, doiError: null, doiAttempts: 1 })
    const record = fake.records.get(doi)!
    expect(record.state).toBe('findable')
    expect(record).toMatchObject({
      titles: [{ title: 'Citable sample' }],
      types: { resourceTypeGeneral: 'Dataset' },
      url: `${t.config.publicUrl}/d/${d.accession}/v/1`,
      version: '1',
    })
    const api = await request(t.app)
      .get(`/api/datasets/${d.id}/versions/1`)
      .set(bearer(depositorToken))
    expect(api.body).toMatchObject({ doi, doiStatus: 'registered' })
    const mail = await mailTo(t.mail, depositor.email)
    expect(mail.text).toContain(`https://doi.org/${doi}`)
    // Nothing more is due.
    expect(await registrar.runDue()).toBe(0)
  })

  it('the stand-in refuses a body without DataCite’s required properties, and bad credentials', async () => {
    const target = { url: fake.url, ...REPOSITORY }
    const noCreators = await publishDoi(target, {
      data: {
        type: 'dois',
        attributes: { doi: '10.5072/stpl-x.v1', titles: [{ title: 'x' }], creators: [] },
      },
    } as never)
    expect(noCreators.ok).toBe(false)
    if (!noCreators.ok) {
      expect(noCreators.error).toMatch(/422/)
      expect(noCreators.error).toMatch(/creators/)
      expect(noCreators.error).toMatch(/publicationYear/)
    }
    const wrong = await publishDoi({ ...target, password: 'guess' }, {
      data: { attributes: { doi: '10.5072/x' } },
    } as never)
    expect(wrong).toEqual({ ok: false, error: 'DataCite answered 401: Bad credentials' })
  })

  it('retries with backoff while DataCite is down, marks the version failed, and a steward retry succeeds', async () => {
    const d = await approved('Registered after an outage')
    fake.down = true
    const start = now
    expect(await registrar.runDue()).toBe(1)
    let v = await versionOf(d.id)
    expect(v).toMatchObject({ doiStatus: 'pending', doiAttempts: 1 })
    expect(v.doiError).toMatch(/503/)
    // Not due again before the backoff: 30 s after the first failure.
    expect(v.doiNextAttemptAt!.getTime() - start.getTime()).toBe(30_000)
    expect(await registrar.runDue()).toBe(0)
    for (let attempt = 2; attempt <= DOI_MAX_ATTEMPTS; attempt++) {
      now = (await versionOf(d.id)).doiNextAttemptAt!
      expect(await registrar.runDue()).toBe(1)
    }
    v = await versionOf(d.id)
    expect(v).toMatchObject({ doiStatus: 'failed', doiAttempts: DOI_MAX_ATTEMPTS, doi: null })
    expect(v.doiNextAttemptAt).toBeNull()
    now = new Date(now.getTime() + 86_400_000)
    expect(await registrar.runDue()).toBe(0)

    // Visible to the steward: on the version and in the work queue.
    const queue = await request(t.app).get('/api/curation/queue').set(bearer(stewardToken))
    expect(queue.body.doiFailed).toEqual([
      expect.objectContaining({
        datasetId: d.id,
        version: 1,
        detail: expect.stringMatching(/503/),
      }),
    ])
    const retryPath = `/api/datasets/${d.id}/versions/1/doi`
    expect((await request(t.app).post(retryPath).set(bearer(depositorToken))).status).toBe(403)
    const retry = await request(t.app).post(retryPath).set(bearer(stewardToken))
    expect(retry.status).toBe(202)
    expect(retry.body).toMatchObject({ doiStatus: 'pending', doiAttempts: 0 })

    fake.down = false
    now = new Date(Date.now() + 1000)
    expect(await registrar.runDue()).toBe(1)
    expect(await versionOf(d.id)).toMatchObject({ doiStatus: 'registered', doiError: null })
    expect((await request(t.app).post(retryPath).set(bearer(stewardToken))).status).toBe(409)
    const after = await request(t.app).get('/api/curation/queue').set(bearer(stewardToken))
    expect(after.body.doiFailed).toEqual([])
  })
})

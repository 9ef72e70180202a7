import { readFileSync } from 'node:fs'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DatasetMetadata } from '@server/modules/metadata/dataset-metadata.entity'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { omeStandardFile } from '../fixtures/ome-standard'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let depositor: string
let outsider: string
let projectId: number
let draftId: number
beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const member = await buildMember(em)
  projectId = (await buildProject(em, [{ user: member, role: 'member' }])).id
  depositor = await tokenFor(em, member)
  outsider = await tokenFor(em, await buildMember(em))
  draftId = (await buildDataset(em, projectId, { complete: false })).id
})
afterAll(() => t.close())

const put = (id: number, body: unknown, token = depositor) =>
  request(t.app)
    .put(`/api/datasets/${id}/metadata`)
    .set(bearer(token))
    .send(body as object)

describe('the metadata routes', () => {
  it('serve the vocabulary as JSON Schema', async () => {
    const res = await request(t.app).get('/api/vocabulary')
    expect(res.body.$schema).toBe('https://json-schema.org/draft/2020-12/schema')
    expect(Object.keys(res.body.properties)).toEqual([
      'study',
      'biosample',
      'labelling',
      'instrument',
      'acquisition',
      'processing',
      'files',
    ])
  })

  it('store a draft description and report completeness as it grows', async () => {
    const partial = await put(draftId, {
      instrument: { objective: { lensNA: 1.49, immersion: 'Oil' } },
    })
    expect(partial.status).toBe(200)
    const full = await put(draftId, completeMetadata())
    expect(full.body.completeness.score).toBeGreaterThan(partial.body.completeness.score)
    expect(full.body.completeness.readyToSubmit).toBe(true)
    const read = await request(t.app)
      .get(`/api/datasets/${draftId}/metadata`)
      .set(bearer(depositor))
    expect(read.body.metadata.instrument.objective.lensNA).toBe(1.49)
    const gaps = await request(t.app)
      .get(`/api/datasets/${draftId}/completeness`)
      .set(bearer(depositor))
    expect(gaps.body.sections).toHaveLength(7)
  })

  it('answer invalid values with field errors and keep what was stored', async () => {
    const em = t.em()
    const before = (await em.findOneOrFail(DatasetMetadata, { dataset: draftId })).document
    const res = await put(draftId, {
      ...completeMetadata(),
      acquisition: { emissionWavelengthNm: 5000 },
      study: { authors: [{ name: 'X', orcid: '0000-0002-1825-0098' }] },
    })
    expect(res.status).toBe(400)
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer).sort()).toEqual([
      '#/acquisition/emissionWavelengthNm',
      '#/study/authors/0/orcid',
    ])
    expect((await t.em().findOneOrFail(DatasetMetadata, { dataset: draftId })).document).toEqual(
      before,
    )
  })

  it('let only depositors edit, and hide drafts from outsiders', async () => {
    expect((await put(draftId, {}, outsider)).status).toBe(404)
    expect((await request(t.app).get(`/api/datasets/${draftId}/metadata`)).status).toBe(404)
  })

  it('export OME-XML, DataCite, JSON-LD and methods text with their media types', async () => {
    const base = `/api/datasets/${draftId}/export`
    const ome = await request(t.app).get(`${base}/ome-xml`).set(bearer(depositor))
    expect(ome.headers['content-type']).toMatch(/application\/xml/)
    expect(ome.text).toContain('<Objective')
    const datacite = await request(t.app).get(`${base}/datacite`).set(bearer(depositor))
    expect(JSON.parse(datacite.text).data.attributes.types.resourceTypeGeneral).toBe('Dataset')
    const ld = await request(t.app).get(`${base}/jsonld`).set(bearer(depositor))
    expect(ld.headers['content-type']).toMatch(/application\/ld\+json/)
    const methods = await request(t.app).get(`${base}/methods`).set(bearer(depositor))
    expect(methods.text).toMatch(/^Nuclear pore complex was imaged/)
    expect((await request(t.app).get(`${base}/pdf`).set(bearer(depositor))).status).toBe(400)
  })

  it('import OME-XML as prefill, refusing hostile documents', async () => {
    const xml = readFileSync(omeStandardFile('instrument.ome.xml'), 'utf8')
    const res = await request(t.app)
      .post('/api/metadata/import')
      .set(bearer(depositor))
      .set('content-type', 'application/xml')
      .send(xml)
    expect(res.status).toBe(200)
    expect(res.body.metadata.instrument.microscopeType).toBe('Inverted')
    expect(res.body.ignored.length).toBeGreaterThan(0)
    const hostile = await request(t.app)
      .post('/api/metadata/import')
      .set(bearer(depositor))
      .set('content-type', 'application/xml')
      .send('<!DOCTYPE x [<!ENTITY a "b">]><OME/>')
    expect(hostile.status).toBe(400)
    expect(hostile.body.detail).toMatch(/document type declaration/)
    const huge = await request(t.app)
      .post('/api/metadata/import')
      .set(bearer(depositor))
      .set('content-type', 'application/xml')
      .send(`<OME>${' '.repeat(3 * 1024 * 1024)}</OME>`)
    expect(huge.status).toBe(413)
    expect(
      (
        await request(t.app)
          .post('/api/metadata/import')
          .set('content-type', 'application/xml')
          .send(xml)
      ).status,
    ).toBe(401)
  })

  it('suggest values already used in the project', async () => {
    const res = await request(t.app)
      .get(`/api/projects/${projectId}/suggestions`)
      .set(bearer(depositor))
    expect(res.body['biosample.structure']).toEqual(['nuclear pore complex'])
    expect(res.body['labelling.*.target']).toEqual(['Nup96'])
  })

  it('keep saved instruments per lab', async () => {
    const instrument = completeMetadata().instrument
    const created = await request(t.app)
      .post('/api/instrument-profiles')
      .set(bearer(depositor))
      .send({ name: 'TIRF rig 2', instrument })
    expect(created.status).toBe(201)
    expect(
      (
        await request(t.app)
          .post('/api/instrument-profiles')
          .set(bearer(depositor))
          .send({ name: 'TIRF rig 2', instrument })
      ).status,
    ).toBe(409)
    const mine = await request(t.app).get('/api/instrument-profiles').set(bearer(depositor))
    expect(mine.body.items.map((i: { name: string }) => i.name)).toEqual(['TIRF rig 2'])
    const theirs = await request(t.app).get('/api/instrument-profiles').set(bearer(outsider))
    expect(theirs.body.items).toEqual([])
    expect(
      (
        await request(t.app)
          .delete(`/api/instrument-profiles/${created.body.id}`)
          .set(bearer(outsider))
      ).status,
    ).toBe(404)
    const bad = await request(t.app)
      .post('/api/instrument-profiles')
      .set(bearer(depositor))
      .send({ name: 'Broken', instrument: { objective: { lensNA: 3 } } })
    expect(bad.status).toBe(400)
  })
})

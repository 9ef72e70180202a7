/**
 * Region measurements and region exchange through the API: a collaborator measures a region
 * (summary, DBSCAN, Ripley, nearest neighbours, profile), a repeat comes from the cache, refusals
 * state their limit, people without access learn nothing, and a table's regions go out as GeoJSON
 * and OME-XML and come back in.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { measurementResultSchema } from '@shared/schemas/region-measurement.schema'
import { bearer } from '../fixtures/builders'
import { settledFile } from '../fixtures/job-runner'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp
let fileId: number
let regionId: number
let lineId: number

const as = (who: string) => bearer(app.tokens[who]!)
const regionsPath = () => `/api/datasets/${app.dataset.accession}/files/${fileId}/regions`
const measure = (who: string, id: number, query: Record<string, string | number>) =>
  request(app.t.app).get(`/api/regions/${id}/measurements`).query(query).set(as(who))

beforeAll(async () => {
  app = await startSharedDraftApp({
    annotator: ['preview', 'annotate'],
    previewer: ['preview'],
    reader: [],
  })
  const { localizations } = simulateLocalizations({
    seed: 6,
    fieldNm: 4000,
    emitters: 1500,
    frames: 300,
    structure: { kind: 'clusters', count: 30, radiusNm: 30 },
  })
  fileId = await app.upload('clusters.csv', Buffer.from(localizationsToCsv(localizations)))
  expect((await settledFile(app.t, fileId, 60_000)).status).toBe('ready')
  const drawn = await request(app.t.app)
    .post(regionsPath())
    .set(as('annotator'))
    .send({
      label: 'Middle',
      geometry: {
        type: 'Polygon',
        coordinates: [
          [
            [500, 500],
            [3500, 500],
            [3500, 3500],
            [500, 3500],
            [500, 500],
          ],
        ],
      },
    })
  expect(drawn.status).toBe(201)
  regionId = drawn.body.id
  const line = await request(app.t.app)
    .post(regionsPath())
    .set(as('annotator'))
    .send({
      label: 'Across',
      geometry: {
        type: 'LineString',
        coordinates: [
          [500, 2000],
          [3500, 2000],
        ],
        width: 400,
      },
    })
  expect(line.status).toBe(201)
  lineId = line.body.id
}, 120_000)
afterAll(() => app.close())

describe('measurements of a region', { timeout: 60_000 }, () => {
  it('summary, then the same answer from the cache', async () => {
    const first = await measure('previewer', regionId, { kind: 'summary' })
    expect(first.status).toBe(200)
    const body = measurementResultSchema.parse(first.body)
    expect(body).toMatchObject({ kind: 'summary', areaNm2: 9e6, cached: false })
    expect(body.count).toBeGreaterThan(100)
    const again = await measure('previewer', regionId, { kind: 'summary' })
    expect(again.body).toMatchObject({ count: body.count, cached: true, computeMs: 0 })
  })

  it('DBSCAN states its convention and lists clusters; Ripley and NN answer their curves', async () => {
    const db = measurementResultSchema.parse(
      (await measure('previewer', regionId, { kind: 'dbscan', eps: 25, minPts: 5 })).body,
    )
    if (db.kind !== 'dbscan') throw new Error(db.kind)
    expect(db.convention).toMatch(/counts the localization itself/)
    expect(db.clusters.length).toBeGreaterThan(5)
    expect(db.clusters[0]).toMatchObject({ size: expect.any(Number), area: expect.any(Number) })
    const rip = measurementResultSchema.parse(
      (
        await measure('previewer', regionId, {
          kind: 'ripley',
          rMax: 300,
          simulations: 19,
          steps: 10,
        })
      ).body,
    )
    if (rip.kind !== 'ripley') throw new Error(rip.kind)
    expect(rip.r).toHaveLength(10)
    expect(rip.envelope!.high[2]!).toBeLessThan(rip.L[2]!) // clustered: above CSR at 90 nm
    const nn = measurementResultSchema.parse(
      (await measure('previewer', regionId, { kind: 'nn' })).body,
    )
    if (nn.kind !== 'nn') throw new Error(nn.kind)
    expect(nn.counts.reduce((a, b) => a + b, 0)).toBe(nn.count)
  })

  it('a line region gives a profile; a polygon does not', async () => {
    const profile = await measure('previewer', lineId, { kind: 'profile', binNm: 10 })
    expect(profile.status).toBe(200)
    expect(profile.body.positions).toHaveLength(300)
    const refused = await measure('previewer', regionId, { kind: 'profile' })
    expect(refused.status).toBe(422)
    expect(refused.headers['content-type']).toMatch(/problem\+json/)
    expect(refused.body.detail).toMatch(/along a line region/)
  })

  it('refuses work past a limit with the limit stated, and parameters out of range', async () => {
    const big = await measure('previewer', regionId, { kind: 'ripley', rMax: 2000 })
    expect(big.status).toBe(422)
    expect(big.body.detail).toMatch(/at most half the region's shorter side \(1500 nm here\)/)
    const bad = await measure('previewer', regionId, { kind: 'dbscan', eps: -3 })
    expect(bad.status).toBe(400)
    expect((await measure('previewer', regionId, { kind: 'volume' })).status).toBe(400)
  })

  it('is not found for someone who may not see the dataset, or without a sign-in', async () => {
    expect((await measure('reader', regionId, { kind: 'summary' })).status).toBe(404)
    expect(
      (await request(app.t.app).get(`/api/regions/${regionId}/measurements?kind=summary`)).status,
    ).toBe(404)
  })
})

describe('region exchange', { timeout: 60_000 }, () => {
  it('exports GeoJSON in nm and OME-XML, and imports them back', async () => {
    const geo = await request(app.t.app)
      .get(`${regionsPath()}/export?format=geojson`)
      .set(as('previewer'))
    expect(geo.status).toBe(200)
    const doc = JSON.parse(geo.text)
    expect(doc.properties.units).toBe('nm')
    expect(doc.features).toHaveLength(2)
    const ome = await request(app.t.app)
      .get(`${regionsPath()}/export?format=ome-xml`)
      .set(as('previewer'))
    expect(ome.status).toBe(200)
    expect(ome.text).toContain('<ROI ID="ROI:1" Name="Middle">')

    const imported = await request(app.t.app)
      .post(`${regionsPath()}/import`)
      .set(as('annotator'))
      .send({ format: 'ome-xml', content: ome.text })
    expect(imported.status).toBe(201)
    expect(imported.body.created.map((r: { label: string }) => r.label)).toEqual([
      'Middle',
      'Across',
    ])
    const refused = await request(app.t.app)
      .post(`${regionsPath()}/import`)
      .set(as('previewer'))
      .send({ format: 'geojson', content: geo.text })
    expect(refused.status).toBe(403)
    const notJson = await request(app.t.app)
      .post(`${regionsPath()}/import`)
      .set(as('annotator'))
      .send({ format: 'geojson', content: '{oops' })
    expect(notJson.status).toBe(400)
  })
})

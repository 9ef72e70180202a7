/**
 * The zoomable preview through the API: the pyramid's description, tiles rendered in the pool and
 * cached on disk, bad options and tiles outside the pyramid refused as problems, and every tile
 * request authorised by the preview right.
 */
import { existsSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import request from 'supertest'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { previewInfoSchema, type PreviewInfo } from '@shared/schemas/preview.schema'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { LocalStorage } from '@server/storage/local-storage'
import { bearer, buildDataset } from '../fixtures/builders'
import { settledFile } from '../fixtures/job-runner'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp
let fileId: number

beforeAll(async () => {
  app = await startSharedDraftApp({ reader: [] })
  // About 36 000 localizations: level 0 draws enough of them to be kept on disk, a deepest tile
  // (a few hundred) does not.
  const { localizations } = simulateLocalizations({
    seed: 3,
    fieldNm: 4000,
    emitters: 6000,
    frames: 1000,
    structure: { kind: 'rings' },
  })
  fileId = await app.upload('rings.csv', Buffer.from(localizationsToCsv(localizations)))
  expect((await settledFile(app.t, fileId, 60_000)).status).toBe('ready')
}, 90_000)
afterAll(() => app.close())

const base = () => `/api/datasets/${app.dataset.accession}/files/${fileId}`
const get = (path: string, who = 'member') =>
  request(app.t.app)
    .get(`${base()}${path}`)
    .set(bearer(app.tokens[who]!))
    .buffer(true)
    .parse((res, done) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => done(null, Buffer.concat(chunks)))
    })

/** The names of the tiles kept on disk for the table, in every view. */
const keptTiles = () => {
  const tiles = join(new LocalStorage(app.t.config.dataDir).derivedDir, String(fileId), 'tiles')
  if (!existsSync(tiles)) return []
  return readdirSync(tiles).flatMap((view) => readdirSync(join(tiles, view)))
}

describe('the preview of a table', () => {
  let info: PreviewInfo

  it('describes its pyramid: the whole field at level 0, about 1 nm per pixel at the deepest', async () => {
    const res = await request(app.t.app).get(`${base()}/preview`).set(bearer(app.tokens.member!))
    expect(res.status).toBe(200)
    info = previewInfoSchema.parse(res.body)
    expect(info.tileSize).toBe(256)
    expect(info.resolutionsNm.at(-1)).toBe(1)
    expect(info.resolutionsNm[0]! * 256).toBeGreaterThanOrEqual(
      info.boundsNm.xMax - info.boundsNm.xMin,
    )
    expect(info.hasUncertainty).toBe(true)
  })

  it('renders a tile as a 256 × 256 PNG with something drawn, and keeps it on disk', async () => {
    const res = await get('/tiles/0/0/0.png')
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('image/png')
    const { data, info: png } = await sharp(res.body as Buffer)
      .raw()
      .toBuffer({ resolveWithObject: true })
    expect([png.width, png.height]).toEqual([256, 256])
    expect(data.some((v) => v > 0)).toBe(true)
    await vi.waitFor(() => expect(keptTiles()).toContain('0-0-0.png'))
    const again = await get('/tiles/0/0/0.png')
    expect(Buffer.compare(again.body as Buffer, res.body as Buffer)).toBe(0)
  })

  it('draws a deep tile of few localizations each time instead of keeping it', async () => {
    const deep = info.levels - 1
    // The tile at the field's centre, where the rings are.
    const tileNm = info.tileSize * info.resolutionsNm[deep]!
    const { xMin, xMax, yMin, yMax } = info.boundsNm
    const x = Math.floor(((xMin + xMax) / 2 - info.originNm.x) / tileNm)
    const y = Math.floor(((yMin + yMax) / 2 - info.originNm.y) / tileNm)
    const res = await get(`/tiles/${deep}/${x}/${y}.png`)
    expect(res.status).toBe(200)
    const { data } = await sharp(res.body as Buffer)
      .raw()
      .toBuffer({ resolveWithObject: true })
    expect(data.some((v) => v > 0)).toBe(true)
    const again = await get(`/tiles/${deep}/${x}/${y}.png`)
    expect(Buffer.compare(again.body as Buffer, res.body as Buffer)).toBe(0)
    expect(keptTiles()).toContain('0-0-0.png')
    expect(keptTiles()).not.toContain(`${deep}-${x}-${y}.png`)
  })

  it('draws differently with other options (colormap, Gaussian rendering)', async () => {
    const plain = (await get('/tiles/0/0/0.png')).body as Buffer
    const grey = (await get('/tiles/0/0/0.png?colormap=grayscale')).body as Buffer
    const gaussian = (await get('/tiles/0/0/0.png?method=gaussian')).body as Buffer
    expect(Buffer.compare(plain, grey)).not.toBe(0)
    expect(Buffer.compare(plain, gaussian)).not.toBe(0)
  })

  it('refuses unknown options and tiles outside the pyramid as problems', async () => {
    const unknown = await request(app.t.app)
      .get(`${base()}/tiles/0/0/0.png?colormap=rainbow`)
      .set(bearer(app.tokens.member!))
    expect(unknown.status).toBe(400)
    expect(unknown.headers['content-type']).toContain('problem+json')
    const extra = await request(app.t.app)
      .get(`${base()}/tiles/0/0/0.png?shine=1`)
      .set(bearer(app.tokens.member!))
    expect(extra.status).toBe(400)
    const outside = await request(app.t.app)
      .get(`${base()}/tiles/0/5/0.png`)
      .set(bearer(app.tokens.member!))
    expect(outside.status).toBe(404)
    expect(outside.headers['content-type']).toContain('problem+json')
    const tooDeep = await request(app.t.app)
      .get(`${base()}/tiles/${info.levels}/0/0.png`)
      .set(bearer(app.tokens.member!))
    expect(tooDeep.status).toBe(404)
  })

  it('authorises every tile by the preview right', async () => {
    expect((await get('/tiles/0/0/0.png', 'reader')).status).toBe(403)
    expect((await get('/tiles/0/0/0.png', 'outsider')).status).toBe(404)
    expect((await request(app.t.app).get(`${base()}/tiles/0/0/0.png`)).status).toBe(404)
  })

  it('finds the table by the dataset’s number or accession, and only in its own dataset', async () => {
    const byNumber = await request(app.t.app)
      .get(`/api/datasets/${app.dataset.id}/files/${fileId}/preview`)
      .set(bearer(app.tokens.member!))
    expect(byNumber.status).toBe(200)
    const other = await buildDataset(app.t.em(), app.dataset.project)
    const elsewhere = await request(app.t.app)
      .get(`/api/datasets/${other.accession}/files/${fileId}/tiles/0/0/0.png`)
      .set(bearer(app.tokens.member!))
    expect(elsewhere.status).toBe(404)
    expect(elsewhere.body.detail).toMatch(/file/i)
    const missing = await request(app.t.app)
      .get(`/api/datasets/STPL-999999/files/${fileId}/tiles/0/0/0.png`)
      .set(bearer(app.tokens.member!))
    expect(missing.status).toBe(404)
    expect(missing.body.detail).toMatch(/dataset/i)
  })

  it('drops its cached tiles when the table is read again with another mapping', async () => {
    const tiles = join(new LocalStorage(app.t.config.dataDir).derivedDir, String(fileId), 'tiles')
    expect(readdirSync(tiles).length).toBeGreaterThan(0)
    const file = await app.t.em().findOneOrFail(DatasetFile, { id: fileId })
    const res = await request(app.t.app)
      .put(`${base()}/mapping`)
      .set(bearer(app.tokens.member!))
      .send(file.mapping ?? {})
    expect(res.status).toBe(202)
    const end = Date.now() + 60_000
    while (
      existsSync(tiles) ||
      (await app.t.em().findOneOrFail(DatasetFile, { id: fileId })).status !== 'ready'
    ) {
      if (Date.now() > end) throw new Error('not re-ingested')
      await new Promise((r) => setTimeout(r, 100))
    }
    expect(existsSync(tiles)).toBe(false)
  })
})

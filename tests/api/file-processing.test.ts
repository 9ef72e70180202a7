/**
 * What happens after an upload: content detection, column mapping (automatic when the header
 * leaves no doubt, by the depositor otherwise), validation and conversion of localization tables,
 * and the streaming pass over raw stacks — all as jobs in worker threads.
 */
import { mkdtempSync, readFileSync, truncateSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { tableFromIPC } from 'apache-arrow'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { JobRunner } from '@server/jobs/job-runner'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { derivedPaths } from '@server/modules/files/file-job-kinds'
import { LocalStorage } from '@server/storage/local-storage'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { settledFile, startJobRunner } from '../fixtures/job-runner'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { writeTiffStack } from '../fixtures/tiff-writer'
import { omeStandardFile } from '../fixtures/ome-standard'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let runner: JobRunner
let token: string
let accession: string
let storage: LocalStorage

beforeAll(async () => {
  t = await createTestApp()
  live = await listen(t.app)
  storage = new LocalStorage(t.config.dataDir)
  runner = startJobRunner(t)
  const em = t.em()
  const member = await buildMember(em)
  const project = await buildProject(em, [{ user: member, role: 'member' }])
  token = await tokenFor(em, member)
  accession = (await buildDataset(em, project.id)).accession
})
afterAll(async () => {
  await runner.stop()
  await live.close()
  await t.close()
})

async function uploadText(name: string, text: string | Buffer) {
  const res = await tusUpload(`${live.url}/api/uploads`, token, Buffer.from(text), {
    dataset: accession,
    filename: name,
  })
  if (!res.fileId) throw new Error(`upload failed: ${res.status} ${res.body}`)
  return Number(res.fileId)
}

const settled = (id: number) => settledFile(t, id, 20_000)

const validation = async (id: number) =>
  (await request(t.app).get(`/api/datasets/${accession}/files/${id}/validation`).set(bearer(token)))
    .body

describe('localization tables', () => {
  it('ingests a table whose header leaves no doubt, without asking', async () => {
    const id = await uploadText(
      'clear.csv',
      'frame,x [nm],y [nm],photons\n1,100.5,200.25,1500\n2,110,210,1400\n3,120,220,1300\n',
    )
    const file = await settled(id)
    expect(file).toMatchObject({ kind: 'localization_table', status: 'ready' })
    const v = await validation(id)
    expect(v.report).toMatchObject({ rowsRead: 3, rowsAccepted: 3, rowsRejected: 0 })
    const table = tableFromIPC(readFileSync(derivedPaths(storage, id).columnar))
    expect(table.numRows).toBe(3)
    expect([...table.getChild('x')!.toArray()].sort((a, b) => a - b)).toEqual([100.5, 110, 120])
  })

  it('waits for the depositor when the header is ambiguous, then ingests with their mapping', async () => {
    const id = await uploadText('ambiguous.csv', 'a,b,c\n10,20,1\n11,21,2\n')
    const waiting = await settled(id)
    expect(waiting.status).toBe('needs_mapping')
    expect(waiting.problem).toBeTruthy()
    const bad = await request(t.app)
      .put(`/api/datasets/${accession}/files/${id}/mapping`)
      .set(bearer(token))
      .send({
        columns: [
          { index: 0, role: 'x', unit: 'nm' },
          { index: 1, role: 'x', unit: 'nm' },
        ],
        frameBase: 1,
      })
    expect(bad.status).toBe(400)
    const res = await request(t.app)
      .put(`/api/datasets/${accession}/files/${id}/mapping`)
      .set(bearer(token))
      .send({
        columns: [
          { index: 0, role: 'x', unit: 'nm' },
          { index: 1, role: 'y', unit: 'nm' },
          { index: 2, role: 'frame' },
        ],
        frameBase: 1,
      })
    expect(res.status).toBe(202)
    expect((await settled(id)).status).toBe('ready')
  })

  it('reads the header again with the separator the depositor declares, and ingests with it', async () => {
    const id = await uploadText('bars.txt', 'frame|x_nm|y_nm\n1|10|20\n2|11|21\n')
    expect(await settled(id)).toMatchObject({ status: 'ready' })
    const put = (body: unknown) =>
      request(t.app)
        .put(`/api/datasets/${accession}/files/${id}/format`)
        .set(bearer(token))
        .send(body as object)
    expect((await put({ delimiter: 'colon' })).status).toBe(400)

    // Declared wrongly: the lines no longer split into columns, and the depositor is told so.
    expect((await put({ delimiter: ',' })).status).toBe(202)
    const wrong = await settled(id)
    expect(wrong.status).not.toBe('ready')
    expect(wrong.problem).toBeTruthy()
    // Declared rightly: read and ingested with it; the report says what was declared.
    expect((await put({ delimiter: '|' })).status).toBe(202)
    expect(await settled(id)).toMatchObject({ status: 'ready' })
    const v = await validation(id)
    expect(v.report).toMatchObject({ rowsAccepted: 2, declaredFormat: { delimiter: '|' } })
    expect(v.report.sniff.delimiter).toBe('|')
  })

  it('converts pixel units with the pixel size: 12.5 px at 107 nm/px is 1337.5 nm', async () => {
    const id = await uploadText('pixels.csv', 'x (px),y (px),frame\n12.5,3,1\n')
    expect((await settled(id)).status).toBe('needs_mapping')
    await request(t.app)
      .put(`/api/datasets/${accession}/files/${id}/mapping`)
      .set(bearer(token))
      .send({
        columns: [
          { index: 0, role: 'x', unit: 'px' },
          { index: 1, role: 'y', unit: 'px' },
          { index: 2, role: 'frame' },
        ],
        frameBase: 1,
        pixelSizeNm: 107,
      })
      .expect(202)
    expect((await settled(id)).status).toBe('ready')
    const table = tableFromIPC(readFileSync(derivedPaths(storage, id).columnar))
    expect(table.getChild('x')!.get(0)).toBeCloseTo(1337.5, 3)
    expect(table.getChild('y')!.get(0)).toBeCloseTo(321, 3)
  })

  it('counts bad rows by reason with their line numbers and keeps the good ones', async () => {
    const id = await uploadText(
      'bad-rows.csv',
      'frame,x_nm,y_nm\n1,1,1\n2,abc,2\n3,NaN,3\n4,Infinity,4\n5,5,5\n',
    )
    const file = await settled(id)
    expect(file.status).toBe('ready')
    const v = await validation(id)
    expect(v.report.rowsAccepted).toBe(2)
    expect(v.report.rowsRejected).toBe(3)
    const examples = Object.values(
      v.report.rejected as Record<string, { examples: { line: number }[] }>,
    ).flatMap((r) => r.examples.map((e) => e.line))
    expect(examples.sort()).toEqual([3, 4, 5])
  })

  it('explains a table with no x or y column, and an empty table', async () => {
    const id = await uploadText('no-xy.csv', 'frame,photons\n1,100\n2,200\n')
    const file = await settled(id)
    expect(file.status).toBe('needs_mapping')
    expect(file.problem).toMatch(/\bx\b|\by\b/)
    const header = await uploadText('header-only.csv', 'frame,x [nm],y [nm]\n')
    expect((await settled(header)).problem).toBeTruthy()
  })
})

describe('raw stacks', () => {
  it('reads the header, traces the frame means and renders a projection thumbnail', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'stack-'))
    const path = join(dir, 'stack.tif')
    // Known ground truth: frame f has every pixel at 100 + f, so its mean is 100 + f.
    writeTiffStack(path, {
      width: 32,
      height: 24,
      frames: 12,
      pixels: (f) => new Array(32 * 24).fill(100 + f),
      description: readFileSync(omeStandardFile('minimum-specification.ome.xml'), 'utf8'),
    })
    const id = await uploadText('stack.tif', readFileSync(path))
    const file = await settled(id)
    expect(file).toMatchObject({ kind: 'raw_stack', status: 'ready' })
    expect(file.report).toMatchObject({
      width: 32,
      height: 24,
      frames: 12,
      bitsPerSample: 16,
      hasOmeXml: true,
    })
    const trace = JSON.parse(readFileSync(derivedPaths(storage, id).trace, 'utf8')) as number[]
    expect(trace).toEqual(Array.from({ length: 12 }, (_, f) => 100 + f))
    expect(readFileSync(derivedPaths(storage, id).thumbnail).subarray(1, 4).toString()).toBe('PNG')
    expect((file.report as { omePrefill: { metadata: unknown } }).omePrefill.metadata).toEqual({
      acquisition: { frames: 2 },
    })
    const png = await request(t.app)
      .get(`/api/datasets/${accession}/files/${id}/thumbnail.png`)
      .set(bearer(token))
    expect(png.headers['content-type']).toBe('image/png')
    const means = await request(t.app)
      .get(`/api/datasets/${accession}/files/${id}/frame-means.json`)
      .set(bearer(token))
    expect(means.body).toHaveLength(12)
  })

  it('waits for every part of a multi-file OME-TIFF, then scans them all in plane order', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'parts-'))
    const ome = (uuid: string) => `<?xml version="1.0" encoding="UTF-8"?>
<OME xmlns="http://www.openmicroscopy.org/Schemas/OME/2016-06" UUID="${uuid}">
  <Image ID="Image:0"><Pixels ID="Pixels:0" DimensionOrder="XYZCT" Type="uint16" SizeX="8" SizeY="8" SizeZ="1" SizeC="1" SizeT="7">
    <Channel ID="Channel:0:0" SamplesPerPixel="1"/>
    <TiffData IFD="0" PlaneCount="4" FirstT="0"><UUID FileName="run_part0.ome.tif">urn:uuid:00000000-0000-4000-8000-000000000001</UUID></TiffData>
    <TiffData IFD="0" PlaneCount="3" FirstT="4"><UUID FileName="run_part1.ome.tif">urn:uuid:00000000-0000-4000-8000-000000000002</UUID></TiffData>
  </Pixels></Image>
</OME>`
    // Plane t holds the value 10 + t in every pixel, over both files.
    writeTiffStack(join(dir, 'p0.tif'), {
      width: 8,
      height: 8,
      frames: 4,
      pixels: (f) => new Array(64).fill(10 + f),
      description: ome('urn:uuid:00000000-0000-4000-8000-000000000001'),
    })
    writeTiffStack(join(dir, 'p1.tif'), {
      width: 8,
      height: 8,
      frames: 3,
      pixels: (f) => new Array(64).fill(14 + f),
      description: ome('urn:uuid:00000000-0000-4000-8000-000000000002'),
    })
    const first = await settled(
      await uploadText('run_part0.ome.tif', readFileSync(join(dir, 'p0.tif'))),
    )
    expect(first.problem).toBe('Part of a multi-file OME-TIFF; still to upload: run_part1.ome.tif.')
    const second = await settled(
      await uploadText('run_part1.ome.tif', readFileSync(join(dir, 'p1.tif'))),
    )
    await settled(second.id)
    const end = Date.now() + 15_000
    let whole = await t.em().findOneOrFail(DatasetFile, { id: second.id })
    while ((whole.report as { frames?: number }).frames !== 7 && Date.now() < end) {
      await new Promise((r) => setTimeout(r, 100))
      whole = await settled(second.id)
    }
    expect(whole.report).toMatchObject({ frames: 7 })
    expect(JSON.parse(readFileSync(derivedPaths(storage, second.id).trace, 'utf8'))).toEqual([
      10, 11, 12, 13, 14, 15, 16,
    ])
  })

  it('rejects a truncated stack with the reason in words', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'stack-'))
    const path = join(dir, 'cut.tif')
    const written = writeTiffStack(path, {
      width: 64,
      height: 64,
      frames: 6,
      pixels: () => new Array(64 * 64).fill(7),
    })
    truncateSync(path, Math.floor(written.bytes * 0.6))
    const file = await settled(await uploadText('cut.tif', readFileSync(path)))
    expect(file.status).toBe('rejected')
    expect(file.problem).toMatch(/ends at byte|truncated/i)
    writeFileSync(join(dir, 'unused'), '')
  })
})

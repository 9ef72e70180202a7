/**
 * The upload routes of the app on the S3 profile (the bucket an s3rver stand-in): a finished
 * upload is registered from the bucket (copied to `files/<dataset>/<upload>`, the upload object
 * and record deleted), nothing lands on the node's disk, every refusal leaves no object behind
 * (checked by listing the bucket, unfinished multipart uploads included), a fault while
 * registering keeps the upload for the start-up repair, and the bucket going away answers 503
 * until it is back.
 */
import { createHash, randomBytes } from 'node:crypto'
import { readdirSync } from 'node:fs'
import { join } from 'node:path'
import type { Readable } from 'node:stream'
import {
  GetObjectCommand,
  ListMultipartUploadsCommand,
  ListObjectsV2Command,
} from '@aws-sdk/client-s3'
import request from 'supertest'
import { Upload as TusClient } from 'tus-js-client'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import type { Uploads } from '@server/modules/uploads/uploads'
import { UploadReservation } from '@server/modules/uploads/upload-reservation.entity'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { listen } from '../fixtures/live-server'
import { refuseUploadAudit } from '../fixtures/audit-fault'
import { patchUpload } from '../fixtures/node-cluster'
import { startS3, type S3Fixture } from '../fixtures/s3'
import { createTestApp, type TestApp } from '../fixtures/test-app'

const MiB = 1024 * 1024
const PREFIX = 'node/'
const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex')

let s3: S3Fixture
let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let token: string
let projectId: number

beforeAll(async () => {
  s3 = await startS3()
  t = await createTestApp({
    ...s3.env(PREFIX),
    UPLOAD_MAX_BYTES: String(32 * MiB),
    PROJECT_QUOTA_BYTES: String(80 * MiB),
  })
  live = await listen(t.app)
  const em = t.em()
  const member = await buildMember(em)
  projectId = (await buildProject(em, [{ user: member, role: 'member' }])).id
  token = await tokenFor(em, member)
}, 60_000)

afterAll(async () => {
  await live?.close()
  await t?.close()
  await s3?.stop()
})

/** Every key in the bucket (below the node's prefix) and every unfinished multipart upload. */
async function bucketKeys(): Promise<{ objects: string[]; multipart: string[] }> {
  const objects: string[] = []
  let ContinuationToken: string | undefined
  do {
    const page = await s3.client.send(
      new ListObjectsV2Command({ Bucket: s3.bucket, Prefix: PREFIX, ContinuationToken }),
    )
    objects.push(...(page.Contents ?? []).map((o) => o.Key!.slice(PREFIX.length)))
    ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined
  } while (ContinuationToken)
  const open = await s3.client.send(
    new ListMultipartUploadsCommand({ Bucket: s3.bucket, Prefix: PREFIX }),
  )
  const multipart = (open.Uploads ?? []).map((u) => u.Key!.slice(PREFIX.length))
  return { objects: objects.sort(), multipart: multipart.sort() }
}

/** Keys of one upload, wherever they are (upload object, record, tail, original). */
async function keysOf(uploadId: string) {
  const { objects, multipart } = await bucketKeys()
  return {
    objects: objects.filter((k) => k.includes(uploadId)),
    multipart: multipart.filter((k) => k.includes(uploadId)),
  }
}

async function objectSha256(key: string): Promise<string> {
  const res = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: PREFIX + key }))
  const hash = createHash('sha256')
  for await (const chunk of res.Body as Readable) hash.update(chunk as Buffer)
  return hash.digest('hex')
}

/** Bytes under the node's own folders: on the S3 profile an upload leaves none there. */
const nodeBytes = () =>
  ['uploads', 'files'].flatMap((dir) =>
    readdirSync(join(t.config.dataDir, dir), { recursive: true }).map(String),
  )

/** One upload with tus-js-client, answering the outcome and the upload's id. */
function upload(data: Buffer, dataset: string, filename: string, chunkSize = 4 * MiB) {
  return new Promise<{
    status: number | null
    fileId: string | null
    body: string
    uploadId: string
  }>((resolve) => {
    const client: TusClient = new TusClient(data, {
      endpoint: `${live.url}/api/uploads`,
      headers: { Authorization: `Bearer ${token}` },
      metadata: { dataset, filename },
      chunkSize,
      retryDelays: [],
    })
    const uploadId = () => client.url?.split('/').pop() ?? ''
    client.options.onSuccess = ({ lastResponse }) =>
      resolve({
        status: lastResponse.getStatus(),
        fileId: lastResponse.getHeader('Stipple-File-Id') ?? null,
        body: '',
        uploadId: uploadId(),
      })
    client.options.onError = (err) => {
      const res = (err as { originalResponse?: { getStatus(): number; getBody(): string } })
        .originalResponse
      resolve({
        status: res?.getStatus() ?? null,
        fileId: null,
        body: res?.getBody() ?? String(err),
        uploadId: uploadId(),
      })
    }
    client.start()
  })
}

const tus = { 'Tus-Resumable': '1.0.0' }
const meta = (v: string) => Buffer.from(v).toString('base64')
/** One tus PATCH through the live server (fetch), with the body read as text. */
async function patch(path: string, offset: number, body: Buffer) {
  const res = await patchUpload(`${live.url}${path}`, token, offset, body)
  return { status: res.status, headers: res.headers, text: await res.text() }
}
async function create(accession: string, size: number, name = 'part.bin') {
  return request(live.url)
    .post('/api/uploads')
    .set(bearer(token))
    .set(tus)
    .set('Upload-Length', String(size))
    .set('Upload-Metadata', `dataset ${meta(accession)},filename ${meta(name)}`)
}

describe('uploads into the bucket (S3 profile)', () => {
  it('registers a finished upload from the bucket, leaving only the original there and nothing on the node', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    // 4 MiB requests below the store's 8 MiB parts: tails wait in the bucket between PATCHes.
    const data = randomBytes(19 * MiB + 5)
    const res = await upload(data, dataset.accession, 'frames.bin')
    expect(res.status).toBe(204)
    const row = await t.em().findOneOrFail(DatasetFile, { id: Number(res.fileId) })
    expect(row).toMatchObject({ size: data.length, sha256: sha256(data), kind: 'other' })
    expect(row.storageKey).toBe(`${dataset.id}/${res.uploadId}`)

    expect(await keysOf(res.uploadId)).toEqual({
      objects: [`files/${dataset.id}/${res.uploadId}`],
      multipart: [],
    })
    expect(await objectSha256(`files/${row.storageKey}`)).toBe(sha256(data))
    expect(nodeBytes()).toEqual([])
    expect(await t.em().count(UploadReservation, { uploadId: res.uploadId })).toBe(0)

    // Served from the bucket, whole and by range.
    const whole = await request(t.app)
      .get(`/api/datasets/${dataset.accession}/files/${row.id}/content`)
      .set(bearer(token))
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => done(null, Buffer.concat(chunks)))
      })
    expect(whole.status).toBe(200)
    expect(sha256(whole.body as Buffer)).toBe(sha256(data))
  })

  it('tells a table from its first bytes, read from the object', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const table = 'frame\tx [nm]\ty [nm]\n1\t10.5\t20.25\n2\t11\t21\n3\t12\t22\n'
    const res = await upload(Buffer.from(table), dataset.accession, 'spots.dat')
    expect(res.status).toBe(204)
    const row = await t.em().findOneOrFail(DatasetFile, { id: Number(res.fileId) })
    expect(row).toMatchObject({
      kind: 'localization_table',
      mediaType: 'text/tab-separated-values',
      status: 'processing',
    })
  })

  it('refuses an empty file, a duplicate and a size over the limits, leaving no object behind', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const before = await bucketKeys()

    const empty = await upload(Buffer.alloc(0), dataset.accession, 'empty.csv')
    expect(empty.status).toBe(400)
    expect(empty.body).toMatch(/empty \(0 bytes\)/)

    const data = randomBytes(9 * MiB)
    const once = await upload(data, dataset.accession, 'once.bin')
    expect(once.status).toBe(204)
    const twice = await upload(data, dataset.accession, 'twice.bin')
    expect(twice.status).toBe(400)
    expect(JSON.parse(twice.body!).detail).toMatch(/identical \(same SHA-256\) to "once.bin"/)
    expect(await keysOf(twice.uploadId)).toEqual({ objects: [], multipart: [] })

    // Over the size limit, and over the project's quota: refused before anything is stored.
    expect((await create(dataset.accession, 33 * MiB)).status).toBe(413)
    const reserved = await create(dataset.accession, 30 * MiB)
    expect(reserved.status).toBe(201)
    const quota = await create(dataset.accession, 30 * MiB)
    expect(quota.status).toBe(413)
    expect(JSON.parse(quota.text).detail).toMatch(/over its quota/)
    // A cancelled upload (tus termination) takes its multipart upload and record along.
    await request(live.url)
      .delete(reserved.headers.location as string)
      .set(bearer(token))
      .set(tus)
      .expect(204)

    const after = await bucketKeys()
    expect(after.multipart).toEqual(before.multipart)
    expect(after.objects).toEqual(
      [...before.objects, `files/${dataset.id}/${once.uploadId}`].sort(),
    )
    expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(1)
    expect(await t.em().count(UploadReservation)).toBe(0)
  })

  it('removes every object of an upload whose dataset stopped taking files before its last bytes', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const size = 12 * MiB
    const created = await create(dataset.accession, size)
    expect(created.status).toBe(201)
    const path = created.headers.location as string
    const uploadId = path.split('/').pop()!
    // A whole part and a tail in the bucket, then the dataset is submitted.
    expect((await patch(path, 0, randomBytes(9 * MiB))).status).toBe(204)
    expect((await keysOf(uploadId)).objects).toContain(`uploads/${uploadId}.part`)
    await t.em().nativeUpdate(Dataset, { id: dataset.id }, { state: 'submitted' })
    const finish = await patch(path, 9 * MiB, randomBytes(3 * MiB))
    expect(finish.status).toBe(403)
    expect(await keysOf(uploadId)).toEqual({ objects: [], multipart: [] })
    expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(0)
  })

  it('keeps an upload a fault interrupted in the bucket, and the start-up repair registers it from there', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    // A fault at the last write of the registration (the audit event), after the object copy.
    const restore = await refuseUploadAudit(t.orm)
    const data = randomBytes(6 * MiB + 3)
    const res = await upload(data, dataset.accession, 'interrupted.bin')
    await restore()
    expect(res.status).toBe(500)
    expect(res.body).not.toMatch(/audit_event|sqlite|uploads\//i)
    expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(0)
    // Moved already; the record stays for the repair.
    expect((await keysOf(res.uploadId)).objects).toEqual([
      `files/${dataset.id}/${res.uploadId}`,
      `uploads/${res.uploadId}.info`,
    ])

    const uploads = t.app.locals.uploads as Uploads
    expect(await uploads.reconcile()).toBe(1)
    const file = await t.em().findOneOrFail(DatasetFile, { dataset: dataset.id })
    expect(file).toMatchObject({ name: 'interrupted.bin', size: data.length, sha256: sha256(data) })
    expect(await keysOf(res.uploadId)).toEqual({
      objects: [`files/${dataset.id}/${res.uploadId}`],
      multipart: [],
    })
    // Nothing left to repair: a second pass registers nothing twice.
    expect(await uploads.reconcile()).toBe(0)
    expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(1)
  })

  // Last: the bucket goes away and comes back.
  it('answers 503 (423 to a HEAD) while the bucket is away, and the upload resumes once it is back', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const data = randomBytes(10 * MiB)
    const created = await create(dataset.accession, data.length, 'patient.bin')
    const path = created.headers.location as string
    expect((await patch(path, 0, data.subarray(0, 4 * MiB))).status).toBe(204)

    await s3.down()
    try {
      // A HEAD says 423, the failure tus-js-client retries instead of starting over.
      const head = await request(live.url).head(path).set(bearer(token)).set(tus)
      expect(head.status).toBe(423)
      const refused = await patch(path, 4 * MiB, data.subarray(4 * MiB))
      expect(refused.status).toBe(503)
      expect(JSON.parse(refused.text)).toMatchObject({ status: 503, title: 'Try again' })
      expect(refused.text).not.toMatch(/ECONNREFUSED|127\.0\.0\.1|uploads\//)
    } finally {
      await s3.up()
    }

    const head = await request(live.url).head(path).set(bearer(token)).set(tus)
    expect(head.status).toBe(200)
    const offset = Number(head.headers['upload-offset'])
    const rest = await patch(path, offset, data.subarray(offset))
    expect(rest.status).toBe(204)
    const file = await t
      .em()
      .findOneOrFail(DatasetFile, { id: Number(rest.headers.get('stipple-file-id')) })
    expect(file).toMatchObject({ size: data.length, sha256: sha256(data) })
  })
})

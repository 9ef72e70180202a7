import { createHash, randomBytes } from 'node:crypto'
import { request as httpRequest } from 'node:http'
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { Readable } from 'node:stream'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { HashingFileStore } from '@server/modules/uploads/hashing-file-store'
import type { Uploads } from '@server/modules/uploads/uploads'
import { UploadReservation } from '@server/modules/uploads/upload-reservation.entity'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let token: string
let draft: { id: number; accession: string }
let approved: { id: number; accession: string }
const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex')

beforeAll(async () => {
  t = await createTestApp({
    UPLOAD_MAX_BYTES: String(8 * 1024 * 1024),
    PROJECT_QUOTA_BYTES: String(24 * 1024 * 1024),
  })
  live = await listen(t.app)
  const em = t.em()
  const member = await buildMember(em)
  const project = await buildProject(em, [{ user: member, role: 'member' }])
  token = await tokenFor(em, member)
  draft = await buildDataset(em, project.id)
  approved = await buildDataset(em, project.id, { state: 'approved' })
})
afterAll(async () => {
  await live.close()
  await t.close()
})

const endpoint = () => `${live.url}/api/uploads`
const upload = (
  data: Buffer,
  metadata: Record<string, string>,
  options: Parameters<typeof tusUpload>[4] = {},
) => tusUpload(endpoint(), token, data, metadata, options)
/** A bare tus creation request (POST) for the draft; returns the upload's path. */
async function createUpload(filename: string, size: number): Promise<string> {
  const meta = (v: string) => Buffer.from(v).toString('base64')
  const created = await request(live.url)
    .post('/api/uploads')
    .set(bearer(token))
    .set('Tus-Resumable', '1.0.0')
    .set('Upload-Length', String(size))
    .set('Upload-Metadata', `dataset ${meta(draft.accession)},filename ${meta(filename)}`)
  expect(created.status).toBe(201)
  return created.headers.location as string
}
/** A PATCH from offset 0 written by hand, for bodies tus-js-client would never send. */
const rawPatch = (path: string, headers: Record<string, string> = {}) =>
  httpRequest(`${live.url}${path}`, {
    method: 'PATCH',
    headers: {
      ...bearer(token),
      'tus-resumable': '1.0.0',
      'upload-offset': '0',
      'content-type': 'application/offset+octet-stream',
      ...headers,
    },
  })
const fileRow = (id: string | null) => t.em().findOneOrFail(DatasetFile, { id: Number(id) })

describe('resumable uploads with tus-js-client (the protocol’s reference client)', () => {
  it('stores the bytes and their SHA-256, computed while the upload streamed in', async () => {
    const data = randomBytes(3 * 1024 * 1024 + 17)
    const res = await upload(
      data,
      { dataset: draft.accession, filename: 'frames.bin' },
      { chunkSize: 512 * 1024 },
    )
    expect(res.status).toBe(204)
    const row = await fileRow(res.fileId)
    expect(row).toMatchObject({
      name: 'frames.bin',
      size: data.length,
      sha256: sha256(data),
      kind: 'other',
      status: 'ready',
    })
    expect(await t.em().count(UploadReservation)).toBe(0)
    expect(await t.em().count(AuditEvent, { action: 'file.upload' })).toBeGreaterThan(0)
  })

  it('hashes FIPS 180-2 example messages to their published digests', async () => {
    // FIPS 180-2, Appendix B.1 and B.2: "abc" and the 448-bit two-block message.
    const vectors: [string, string][] = [
      ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
      [
        'abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq',
        '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
      ],
    ]
    for (const [text, digest] of vectors) {
      const res = await upload(
        Buffer.from(text),
        { dataset: draft.accession, filename: `${text.length}.txt` },
        { chunkSize: 2 },
      )
      expect((await fileRow(res.fileId)).sha256).toBe(digest)
    }
    // Appendix: the empty message, through the store directly (empty uploads are refused).
    const dir = mkdtempSync(join(tmpdir(), 'hash-'))
    writeFileSync(join(dir, 'empty'), '')
    const store = new HashingFileStore({ directory: dir })
    expect((await store.finish('empty')).sha256).toBe(
      'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855',
    )
  })

  it('resumes from the offset the server reports after a dropped connection', async () => {
    const data = randomBytes(2 * 1024 * 1024)
    let url = ''
    // First attempt: only the creation and one chunk, then the client "disappears".
    const head = data.subarray(0, 1024 * 1024)
    const first = await upload(
      Buffer.concat([head]),
      { dataset: draft.accession, filename: 'partial.bin' },
      { onCreated: (u) => (url = u) },
    )
    expect(first.fileId).not.toBeNull() // a 1 MiB file in its own right: that one completed
    // Now a true interruption: PATCH half of a declared 2 MiB upload, then resume with the client.
    const created = await request(live.url)
      .post('/api/uploads')
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .set('Upload-Length', String(data.length))
      .set(
        'Upload-Metadata',
        `dataset ${Buffer.from(draft.accession).toString('base64')},filename ${Buffer.from('resumed.bin').toString('base64')}`,
      )
    expect(created.status).toBe(201)
    url = `${live.url}${created.headers.location}`
    await request(url)
      .patch('')
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .set('Upload-Offset', '0')
      .set('Content-Type', 'application/offset+octet-stream')
      .send(data.subarray(0, 700_000))
      .expect(204)
    const probe = await request(url).head('').set(bearer(token)).set('Tus-Resumable', '1.0.0')
    expect(probe.headers['upload-offset']).toBe('700000')
    const finish = await request(url)
      .patch('')
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .set('Upload-Offset', '700000')
      .set('Content-Type', 'application/offset+octet-stream')
      .send(data.subarray(700_000))
    expect(finish.status).toBe(204)
    expect((await fileRow(finish.headers['stipple-file-id'] ?? null)).sha256).toBe(sha256(data))
  })

  it('sanitises file names: no path separators, no traversal, Unicode NFC', async () => {
    const a = await upload(Buffer.from('traversal attempt'), {
      dataset: draft.accession,
      filename: '../../etc/passwd',
    })
    expect((await fileRow(a.fileId)).name).toBe('passwd')
    const b = await upload(Buffer.from('decomposed é'), {
      dataset: draft.accession,
      filename: 'Ce\u0301lls\\sub\\image.tif',
    })
    expect((await fileRow(b.fileId)).name).toBe('image.tif')
    const c = await upload(Buffer.from('nfc'), {
      dataset: draft.accession,
      filename: 'Ce\u0301lls.txt',
    })
    expect((await fileRow(c.fileId)).name).toBe('C\u00e9lls.txt')
    const bad = await upload(Buffer.from('x'), { dataset: draft.accession, filename: '../..' })
    expect(bad.status).toBe(400)
  })

  it('refuses an empty file and a duplicate, leaving nothing registered or on disk', async () => {
    const before = await t.em().count(DatasetFile)
    const empty = await upload(Buffer.alloc(0), { dataset: draft.accession, filename: 'empty.csv' })
    expect(empty.status).toBe(400)
    expect(empty.body).toMatch(/empty \(0 bytes\)/)
    const data = randomBytes(1000)
    expect((await upload(data, { dataset: draft.accession, filename: 'once.bin' })).status).toBe(
      204,
    )
    const twice = await upload(data, { dataset: draft.accession, filename: 'twice.bin' })
    expect(twice.status).toBe(400)
    expect(JSON.parse(twice.body!).detail).toMatch(/identical \(same SHA-256\) to "once.bin"/)
    expect(await t.em().count(DatasetFile)).toBe(before + 1)
    const leftovers = readdirSync(join(t.config.dataDir, 'uploads')).filter(
      (f) => !f.endsWith('.json'),
    )
    expect(leftovers).toEqual([])
  })

  it('refuses uploads to datasets the user may not edit, unknown datasets and missing metadata', async () => {
    expect(
      (await upload(Buffer.from('x'), { dataset: approved.accession, filename: 'late.txt' }))
        .status,
    ).toBe(403)
    expect(
      (await upload(Buffer.from('x'), { dataset: 'STPL-999999', filename: 'x.txt' })).status,
    ).toBe(404)
    const stranger = await tokenFor(t.em(), await buildUser(t.em()))
    expect(
      (
        await tusUpload(endpoint(), stranger, Buffer.from('x'), {
          dataset: draft.accession,
          filename: 'x.txt',
        })
      ).status,
    ).toBe(404)
    expect((await upload(Buffer.from('x'), { filename: 'x.txt' })).status).toBe(400)
    expect(
      (
        await request(live.url)
          .post('/api/uploads')
          .set('Tus-Resumable', '1.0.0')
          .set('Upload-Length', '1')
      ).status,
    ).toBe(401)
  })

  it('answers 413 above the size limit and above the project quota', async () => {
    const big = await request(live.url)
      .post('/api/uploads')
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .set('Upload-Length', String(9 * 1024 * 1024))
      .set(
        'Upload-Metadata',
        `dataset ${Buffer.from(draft.accession).toString('base64')},filename ${Buffer.from('big.bin').toString('base64')}`,
      )
    expect(big.status).toBe(413)
    const reserve = (name: string) =>
      request(live.url)
        .post('/api/uploads')
        .set(bearer(token))
        .set('Tus-Resumable', '1.0.0')
        .set('Upload-Length', String(7 * 1024 * 1024))
        .set(
          'Upload-Metadata',
          `dataset ${Buffer.from(draft.accession).toString('base64')},filename ${Buffer.from(name).toString('base64')}`,
        )
    expect((await reserve('a.bin')).status).toBe(201)
    expect((await reserve('b.bin')).status).toBe(201)
    const third = await reserve('c.bin')
    expect(third.status).toBe(413)
    expect(JSON.parse(third.text).detail).toMatch(/over its quota/)
    // Cancelling (tus termination) frees the reserved space.
    const created = await reserve('d.bin')
    expect(created.status).toBe(413)
    // One of this test's own reservations (rows come in no set order on PostgreSQL, and other
    // tests' uploads to the draft may still hold theirs).
    const reserved = await t.em().findOneOrFail(UploadReservation, { fileName: 'a.bin' })
    await request(live.url)
      .delete(`/api/uploads/${reserved.uploadId}`)
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .expect(204)
    expect((await reserve('e.bin')).status).toBe(201)
  })

  it('lets expired partial uploads go, freeing their space', async () => {
    const uploads = t.app.locals.uploads as Uploads
    const before = readdirSync(join(t.config.dataDir, 'uploads')).length
    expect(before).toBeGreaterThan(0)
    await t
      .em()
      .nativeUpdate(UploadReservation, {}, { createdAt: new Date(Date.now() - 1000 * 3600 * 1000) })
    for (const f of readdirSync(join(t.config.dataDir, 'uploads')).filter((n) =>
      n.endsWith('.json'),
    )) {
      const path = join(t.config.dataDir, 'uploads', f)
      const meta = JSON.parse(readFileSync(path, 'utf8')) as Record<string, unknown>
      writeFileSync(
        path,
        JSON.stringify({
          ...meta,
          creation_date: new Date(Date.now() - 1000 * 3600 * 1000).toISOString(),
        }),
      )
    }
    await uploads.expire()
    expect(readdirSync(join(t.config.dataDir, 'uploads'))).toEqual([])
    expect(await t.em().count(UploadReservation)).toBe(0)
  })

  it('keeps the bytes of a PATCH whose client vanished mid-body, and the checksum stays right on resumption', async () => {
    const data = randomBytes(5 * 1024 * 1024 + 5)
    const path = await createUpload('vanished.bin', data.length)
    // Declares the whole body, sends 4.5 MiB (more than one of the store’s 4 MiB blocks), then cuts the socket.
    await new Promise<void>((resolve) => {
      const req = rawPatch(path, { 'content-length': String(data.length) })
      req.on('error', () => resolve())
      req.write(data.subarray(0, 4.5 * 1024 * 1024), () => setTimeout(() => req.destroy(), 200))
    })
    let offset = 0
    for (let i = 0; i < 50 && offset === 0; i++) {
      await new Promise((r) => setTimeout(r, 50))
      offset = Number(
        (await request(live.url).head(path).set(bearer(token)).set('Tus-Resumable', '1.0.0'))
          .headers['upload-offset'],
      )
    }
    expect(offset).toBeGreaterThan(4 * 1024 * 1024)
    expect(offset).toBeLessThanOrEqual(4.5 * 1024 * 1024)
    const finish = await request(live.url)
      .patch(path)
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .set('Upload-Offset', String(offset))
      .set('Content-Type', 'application/offset+octet-stream')
      .send(data.subarray(offset))
    expect(finish.status).toBe(204)
    expect((await fileRow(finish.headers['stipple-file-id'] ?? null)).sha256).toBe(sha256(data))
  })

  it('writes PATCH bodies straight from the Node request, with no web-stream round trip', async () => {
    const toWeb = vi.spyOn(Readable, 'toWeb')
    const fromWeb = vi.spyOn(Readable, 'fromWeb')
    try {
      const data = randomBytes(2 * 1024 * 1024 + 3)
      const res = await upload(data, { dataset: draft.accession, filename: 'direct.bin' })
      expect(res.status).toBe(204)
      expect((await fileRow(res.fileId)).sha256).toBe(sha256(data))
      expect(toWeb).not.toHaveBeenCalled()
      expect(fromWeb).not.toHaveBeenCalled()
    } finally {
      toWeb.mockRestore()
      fromWeb.mockRestore()
    }
  })

  it('answers 413 to a chunked PATCH longer than the upload, keeping no byte past its end', async () => {
    const size = 1024 * 1024
    const path = await createUpload('overlong.bin', size)
    // No Content-Length, so only the streamed count can tell the body is too long.
    const status = await new Promise<number>((resolve, reject) => {
      const req = rawPatch(path)
      req.on('response', (res) => {
        res.resume()
        resolve(res.statusCode ?? 0)
      })
      req.on('error', reject)
      req.end(randomBytes(size + 256 * 1024))
    })
    expect(status).toBe(413)
    const head = await request(live.url).head(path).set(bearer(token)).set('Tus-Resumable', '1.0.0')
    expect(Number(head.headers['upload-offset'])).toBeLessThanOrEqual(size)
    expect(await t.em().count(DatasetFile, { name: 'overlong.bin' })).toBe(0)
  })

  it('takes the first bytes with the creation request itself (creation-with-upload)', async () => {
    const data = randomBytes(300 * 1024 + 1)
    const meta = (v: string) => Buffer.from(v).toString('base64')
    const created = await request(live.url)
      .post('/api/uploads')
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
      .set('Upload-Length', String(data.length))
      .set('Upload-Metadata', `dataset ${meta(draft.accession)},filename ${meta('at-once.bin')}`)
      .set('Content-Type', 'application/offset+octet-stream')
      .send(data)
    expect(created.status, created.text).toBe(201)
    expect(created.headers['upload-offset']).toBe(String(data.length))
    expect((await fileRow(created.headers['stipple-file-id'] ?? null)).sha256).toBe(sha256(data))
    // Once answered, the finished upload is no longer an upload.
    const head = await request(live.url)
      .head(created.headers.location as string)
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
    expect(head.status).toBe(404)
  })

  it('offers exactly the tus extensions it keeps (no deferred length: quotas need the size)', async () => {
    const res = await request(live.url)
      .options('/api/uploads')
      .set(bearer(token))
      .set('Tus-Resumable', '1.0.0')
    expect(res.status).toBe(204)
    expect(res.headers['tus-version']).toBe('1.0.0')
    expect(String(res.headers['tus-extension']).split(',').sort()).toEqual([
      'creation',
      'creation-with-upload',
      'expiration',
      'termination',
    ])
  })
})

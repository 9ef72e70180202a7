/**
 * Integrity of deposited bytes: every tus request re-checks that the dataset still takes files;
 * a deleted dataset takes its bytes along; bytes with no record are swept; a file's row, its first
 * job and its audit event commit together, and a fault while registering loses nothing.
 */
import { existsSync, mkdirSync, readdirSync, utimesSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { databaseDriver } from '@server/db'
import { Job } from '@server/jobs/job.entity'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { queueMissingFileJobs } from '@server/modules/files/file-jobs'
import { sweepOrphanedBytes } from '@server/modules/files/orphan-sweep.service'
import { UploadReservation } from '@server/modules/uploads/upload-reservation.entity'
import type { Uploads } from '@server/modules/uploads/uploads'
import { LocalStorage } from '@server/storage/local-storage'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let token: string
let projectId: number
let storage: LocalStorage

beforeAll(async () => {
  t = await createTestApp()
  live = await listen(t.app)
  storage = new LocalStorage(t.config.dataDir)
  const em = t.em()
  const member = await buildMember(em)
  projectId = (await buildProject(em, [{ user: member, role: 'member' }])).id
  token = await tokenFor(em, member)
})
afterAll(async () => {
  await live.close()
  await t.close()
})

const meta = (v: string) => Buffer.from(v).toString('base64')
const tus = { 'Tus-Resumable': '1.0.0' }

/** Starts an upload of `size` bytes and sends the first `sent` of them. */
async function startUpload(accession: string, size: number, sent: number) {
  const created = await request(live.url)
    .post('/api/uploads')
    .set(bearer(token))
    .set(tus)
    .set('Upload-Length', String(size))
    .set('Upload-Metadata', `dataset ${meta(accession)},filename ${meta('late.bin')}`)
  expect(created.status).toBe(201)
  const path = created.headers.location as string
  const first = await patch(path, 0, Buffer.alloc(sent, 7))
  expect(first.status).toBe(204)
  return { path, id: path.split('/').pop()! }
}
const patch = (path: string, offset: number, body: Buffer) =>
  request(live.url)
    .patch(path)
    .set(bearer(token))
    .set(tus)
    .set('Upload-Offset', String(offset))
    .set('Content-Type', 'application/offset+octet-stream')
    .send(body)
const uploadBytesExist = (id: string) => existsSync(join(storage.uploadsDir, id))

describe('an upload whose dataset left the editable states', () => {
  it.each(['submitted', 'approved'] as const)(
    'is refused when it is finished after the dataset was %s, and its bytes are removed',
    async (state) => {
      const dataset = await buildDataset(t.em(), projectId)
      const { path, id } = await startUpload(dataset.accession, 20, 10)
      await t.em().nativeUpdate(Dataset, { id: dataset.id }, { state })

      const head = await request(live.url).head(path).set(bearer(token)).set(tus)
      expect(head.status).toBe(403)
      const finish = await patch(path, 10, Buffer.alloc(10, 7))
      expect(finish.status).toBe(404)
      expect(uploadBytesExist(id)).toBe(false)
      expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(0)
      expect(await t.em().count(UploadReservation, { uploadId: id })).toBe(0)
      const manifest = await request(t.app)
        .get(`/api/datasets/${dataset.accession}/manifest.txt`)
        .set(bearer(token))
      expect(manifest.text).toBe('')
    },
  )

  it('refuses the finishing PATCH itself, in words, when the state changed after the last check', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const { path, id } = await startUpload(dataset.accession, 20, 10)
    await t.em().nativeUpdate(Dataset, { id: dataset.id }, { state: 'submitted' })
    const finish = await patch(path, 10, Buffer.alloc(10, 7))
    expect(finish.status).toBe(403)
    expect(JSON.parse(finish.text).detail).toMatch(/no longer takes new files/)
    expect(uploadBytesExist(id)).toBe(false)
    expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(0)
  })
})

describe('bytes of deleted datasets and bytes without a record', () => {
  it('deleting a draft removes its uploaded and derived files', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const res = await tusUpload(`${live.url}/api/uploads`, token, Buffer.from('some bytes'), {
      dataset: dataset.accession,
      filename: 'notes.txt',
    })
    const file = await t.em().findOneOrFail(DatasetFile, { id: Number(res.fileId) })
    writeFileSync(storage.derivedPath(file.id, 'preview.png'), 'derived')
    expect(existsSync(storage.originalPath(file.storageKey))).toBe(true)

    const del = await request(t.app).delete(`/api/datasets/${dataset.accession}`).set(bearer(token))
    expect(del.status).toBe(204)
    expect(existsSync(storage.originalPath(file.storageKey))).toBe(false)
    expect(existsSync(join(storage.derivedDir, String(file.id)))).toBe(false)
  })

  it('finishing an upload after its draft was deleted answers 404 and keeps no bytes', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const { path, id } = await startUpload(dataset.accession, 20, 10)
    await request(t.app).delete(`/api/datasets/${dataset.accession}`).set(bearer(token))
    const finish = await patch(path, 10, Buffer.alloc(10, 7))
    expect(finish.status).toBe(404)
    expect(finish.headers['content-type']).toContain('json')
    expect(uploadBytesExist(id)).toBe(false)
    expect(readdirSync(storage.filesDir)).not.toContain(String(dataset.id))
  })

  it('the sweep removes old bytes no record owns and leaves everything else', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const kept = await tusUpload(`${live.url}/api/uploads`, token, Buffer.from('kept'), {
      dataset: dataset.accession,
      filename: 'kept.txt',
    })
    const keptRow = await t.em().findOneOrFail(DatasetFile, { id: Number(kept.fileId) })
    const old = new Date(Date.now() - 3600_000)
    const stray = (path: string) => {
      mkdirSync(join(path, '..'), { recursive: true })
      writeFileSync(path, 'stray')
      utimesSync(path, old, old)
    }
    stray(join(storage.filesDir, '99999', 'lost-upload'))
    stray(join(storage.derivedDir, '88888', 'localizations.arrow'))
    utimesSync(join(storage.derivedDir, '88888'), old, old)
    stray(join(storage.uploadsDir, 'abandoned-bytes'))
    const young = join(storage.filesDir, '99998', 'just-moved')
    mkdirSync(join(young, '..'), { recursive: true })
    writeFileSync(young, 'registering right now')

    const removed = await sweepOrphanedBytes(t.em(), storage)
    expect(removed).toEqual({ originals: 1, derived: 1, uploads: 1 })
    expect(existsSync(join(storage.filesDir, '99999', 'lost-upload'))).toBe(false)
    expect(existsSync(join(storage.derivedDir, '88888'))).toBe(false)
    expect(existsSync(join(storage.uploadsDir, 'abandoned-bytes'))).toBe(false)
    expect(existsSync(young)).toBe(true)
    expect(existsSync(storage.originalPath(keptRow.storageKey))).toBe(true)
  })
})

describe('registering a finished upload', () => {
  it('commits the row, its first job and the audit event together; a fault keeps the bytes for the repair', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const connection = t.orm.em.getConnection()
    // A fault at the last write of the registration (the audit event), as a full disk would give,
    // in each database's trigger language.
    const postgresql = databaseDriver(t.orm) === 'postgresql'
    if (postgresql) {
      await connection.execute(
        `create function refuse_upload_audit() returns trigger language plpgsql as $$ begin raise exception 'disk I/O error in audit_event'; end $$`,
      )
      await connection.execute(
        `create trigger refuse_upload_audit before insert on audit_event for each row when (new.action = 'file.upload') execute function refuse_upload_audit()`,
      )
    } else
      await connection.execute(
        `create trigger refuse_upload_audit before insert on audit_event when new.action = 'file.upload' begin select raise(abort, 'disk I/O error in audit_event'); end`,
      )
    const table = 'frame,x [nm],y [nm]\n1,10,20\n'
    const res = await tusUpload(`${live.url}/api/uploads`, token, Buffer.from(table), {
      dataset: dataset.accession,
      filename: 'table.csv',
    })
    await connection.execute(
      postgresql
        ? 'drop trigger refuse_upload_audit on audit_event; drop function refuse_upload_audit()'
        : 'drop trigger refuse_upload_audit',
    )
    expect(res.status).toBe(500)
    expect(res.body).not.toMatch(/audit_event|insert|disk I\/O|sqlite/i)
    expect(await t.em().count(DatasetFile, { dataset: dataset.id })).toBe(0)
    expect(await t.em().count(Job, { subjectType: 'file' })).toBe(
      await t.em().count(DatasetFile, { kind: { $in: ['localization_table', 'raw_stack'] } }),
    )

    // The start-up repair registers what the fault interrupted, with its job.
    const uploads = t.app.locals.uploads as Uploads
    expect(await uploads.reconcile()).toBe(1)
    const file = await t.em().findOneOrFail(DatasetFile, { dataset: dataset.id })
    expect(file).toMatchObject({ name: 'table.csv', status: 'processing' })
    expect(await t.em().count(Job, { subjectId: file.id, kind: 'inspect-table' })).toBe(1)
  })

  it('the start-up repair gives every processing file without work its job again', async () => {
    const dataset = await buildDataset(t.em(), projectId)
    const res = await tusUpload(
      `${live.url}/api/uploads`,
      token,
      Buffer.from('frame,x,y\n1,2,3\n'),
      {
        dataset: dataset.accession,
        filename: 'orphan.csv',
      },
    )
    const id = Number(res.fileId)
    // What an older release could leave after a crash: the file row without its job.
    await t.em().nativeDelete(Job, { subjectId: id })
    expect(await queueMissingFileJobs(t.em(), t.config)).toBe(1)
    const job = await t.em().findOneOrFail(Job, { subjectId: id, state: 'queued' })
    expect(job.kind).toBe('inspect-table')
    expect(await queueMissingFileJobs(t.em(), t.config)).toBe(0)
  })
})

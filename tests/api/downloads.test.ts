import { execFileSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let token: string
let accession: string
const files: { name: string; data: Buffer; id: string }[] = []
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex')

beforeAll(async () => {
  t = await createTestApp()
  live = await listen(t.app)
  const em = t.em()
  const member = await buildMember(em)
  const project = await buildProject(em, [{ user: member, role: 'member' }])
  token = await tokenFor(em, member)
  accession = (await buildDataset(em, project.id)).accession
  for (const [name, size] of [
    ['frames 01.bin', 300_000],
    ['notes é.txt', 1000],
  ] as const) {
    const data = name.endsWith('.txt')
      ? Buffer.from('plain notes\n'.repeat(size / 10))
      : randomBytes(size)
    const res = await tusUpload(`${live.url}/api/uploads`, token, data, {
      dataset: accession,
      filename: name,
    })
    files.push({ name, data, id: res.fileId! })
  }
})
afterAll(async () => {
  await live.close()
  await t.close()
})

const content = (id: string) => `/api/datasets/${accession}/files/${id}/content`
const digestOf = (b: Buffer) => `sha-256=:${createHash('sha256').update(b).digest('base64')}:`

describe('downloading a file', () => {
  it('sends the whole file with a strong ETag and RFC 9530 digests', async () => {
    const f = files[0]!
    const res = await request(t.app)
      .get(content(f.id))
      .set(bearer(token))
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => cb(null, Buffer.concat(chunks)))
      })
    expect(res.status).toBe(200)
    expect(sha256(res.body as Buffer)).toBe(sha256(f.data))
    expect(res.headers.etag).toBe(`"${sha256(f.data)}"`)
    expect(res.headers['content-digest']).toBe(digestOf(f.data))
    expect(res.headers['repr-digest']).toBe(digestOf(f.data))
    expect(res.headers['accept-ranges']).toBe('bytes')
    expect(res.headers['content-disposition']).toContain("filename*=UTF-8''frames%2001.bin")
  })

  it('answers Range requests as RFC 9110 specifies', async () => {
    const f = files[0]!
    const part = await request(t.app)
      .get(content(f.id))
      .set(bearer(token))
      .set('Range', 'bytes=100-199')
    expect(part.status).toBe(206)
    expect(part.headers['content-range']).toBe(`bytes 100-199/${f.data.length}`)
    expect(part.headers['content-length']).toBe('100')
    expect(part.headers['content-digest']).toBeUndefined()
    expect(part.headers['repr-digest']).toBe(digestOf(f.data))
    const suffix = await request(t.app)
      .get(content(f.id))
      .set(bearer(token))
      .set('Range', 'bytes=-10')
    expect(suffix.headers['content-range']).toBe(
      `bytes ${f.data.length - 10}-${f.data.length - 1}/${f.data.length}`,
    )
    const beyond = await request(t.app)
      .get(content(f.id))
      .set(bearer(token))
      .set('Range', `bytes=${f.data.length + 5}-`)
    expect(beyond.status).toBe(416)
    expect(beyond.headers['content-range']).toBe(`bytes */${f.data.length}`)
    const unchanged = await request(t.app)
      .get(content(f.id))
      .set(bearer(token))
      .set('If-None-Match', `"${sha256(f.data)}"`)
    expect(unchanged.status).toBe(304)
  })

  it('audits a download once, not once per range', async () => {
    const f = files[1]!
    const count = async () =>
      (await t.em().find(AuditEvent, { action: 'file.download', targetId: accession })).filter(
        (e) => e.details?.file === f.name,
      ).length
    const before = await count()
    await request(t.app).get(content(f.id)).set(bearer(token)).set('Range', 'bytes=0-99')
    await request(t.app).get(content(f.id)).set(bearer(token)).set('Range', 'bytes=100-199')
    await request(t.app).get(content(f.id)).set(bearer(token)).set('Range', 'bytes=200-')
    expect(await count()).toBe(before + 1)
  })

  it('hides files of a dataset the person may not download', async () => {
    const stranger = await tokenFor(t.em(), await buildMember(t.em()))
    expect((await request(t.app).get(content(files[0]!.id)).set(bearer(stranger))).status).toBe(404)
    expect((await request(t.app).get(content('999999')).set(bearer(token))).status).toBe(404)
  })
})

describe('manifest and archive', () => {
  it('writes a manifest that the system’s sha256sum -c verifies', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'manifest-'))
    const manifest = await request(t.app)
      .get(`/api/datasets/${accession}/manifest.txt`)
      .set(bearer(token))
    for (const f of files) writeFileSync(join(dir, f.name), f.data)
    writeFileSync(join(dir, 'manifest.txt'), manifest.text)
    const out = execFileSync('sha256sum', ['-c', 'manifest.txt'], { cwd: dir, encoding: 'utf8' })
    expect(out.trim().split('\n').sort()).toEqual(files.map((f) => `${f.name}: OK`).sort())
  })

  it('streams a zip of the dataset with the manifest inside, readable by a general zip library', async () => {
    const res = await request(t.app)
      .get(`/api/datasets/${accession}/archive.zip`)
      .set(bearer(token))
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => cb(null, Buffer.concat(chunks)))
      })
    expect(res.headers['content-type']).toBe('application/zip')
    const dir = mkdtempSync(join(tmpdir(), 'zip-'))
    mkdirSync(dir, { recursive: true })
    writeFileSync(join(dir, 'archive.zip'), res.body as Buffer)
    // Python's zipfile (standard library) opens and tests the archive; then sha256sum checks the contents.
    execFileSync('python3', [
      '-c',
      'import sys, zipfile; z = zipfile.ZipFile(sys.argv[1]); assert z.testzip() is None; z.extractall(sys.argv[2])',
      join(dir, 'archive.zip'),
      dir,
    ])
    const out = execFileSync('sha256sum', ['-c', 'manifest-sha256.txt'], {
      cwd: join(dir, accession),
      encoding: 'utf8',
    })
    expect(out).toContain('frames 01.bin: OK')
  })
})

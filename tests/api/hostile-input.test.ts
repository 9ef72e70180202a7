/**
 * Input an attacker (or a broken client) sends: each gets a 4xx problem in words, never a 500,
 * never SQL text or a path. Before these guards, every case here answered 500 or misbehaved.
 */
import { gzipSync } from 'node:zlib'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { safeFileName } from '@server/modules/files/file-names'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { listen } from '../fixtures/live-server'
import { createTestApp, TEST_ORIGIN, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let token: string
let projectId: number
let dataset: { id: number; accession: string }
const SIGN_IN_LIMIT = 20

beforeAll(async () => {
  t = await createTestApp({ RATE_LIMIT_SIGN_IN: String(SIGN_IN_LIMIT) })
  live = await listen(t.app)
  const em = t.em()
  const member = await buildMember(em)
  projectId = (await buildProject(em, [{ user: member, role: 'owner' }])).id
  token = await tokenFor(em, member)
  dataset = await buildDataset(em, projectId)
})
afterAll(async () => {
  await live.close()
  await t.close()
})

const NUL = 'a\u0000b'
/** A 4xx problem whose words leak nothing of the server's insides. */
function expectCleanProblem(
  res: { status: number; text: string; headers: Record<string, string> },
  status: number,
) {
  expect(res.status).toBe(status)
  expect(res.headers['content-type']).toContain(PROBLEM_CONTENT_TYPE)
  expect(res.text).not.toMatch(
    /sqlite|select |insert |update |\bwhere\b|node_modules|\/tmp\/|at .*\.ts:/i,
  )
}
const write = (method: 'post' | 'patch' | 'put', path: string) =>
  request(t.app)[method](path).set(bearer(token)).set('Origin', TEST_ORIGIN)

describe('a NUL character in text that would reach SQL', () => {
  it.each([
    ['a search term', () => request(t.app).get(`/api/datasets?q=${encodeURIComponent(NUL)}`)],
    ['a dataset id or accession', () => request(t.app).get('/api/datasets/STPL%00-1')],
    ['a dataset title', () => write('post', '/api/datasets').send({ projectId, title: NUL })],
    [
      'a description',
      () => write('patch', `/api/datasets/${dataset.accession}`).send({ description: NUL }),
    ],
    [
      'a comment',
      () => write('post', `/api/datasets/${dataset.accession}/comments`).send({ body: NUL }),
    ],
    ['a project name', () => write('post', '/api/projects').send({ name: NUL })],
  ])('in %s answers 400', async (_what, send) => {
    expectCleanProblem(await send(), 400)
  })

  it('in tus metadata answers 400 without SQL text', async () => {
    const res = await tusUpload(`${live.url}/api/uploads`, token, Buffer.from('bytes'), {
      dataset: `${dataset.accession}\u0000`,
      filename: 'x.txt',
    })
    expect(res.status).toBe(400)
    expect(res.body).not.toMatch(/sqlite|select|where/i)
  })
})

describe('JSON bodies with a content encoding', () => {
  it('an unsupported encoding answers 415', async () => {
    const res = await write('post', '/api/projects')
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'compress-9000')
      .send(JSON.stringify({ name: 'x' }))
    expectCleanProblem(res, 415)
  })

  it('a corrupt gzip body answers 400', async () => {
    const res = await write('post', '/api/projects')
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'gzip')
      .send(Buffer.from('definitely not gzip'))
    expectCleanProblem(res, 400)
  })

  it('a well-formed gzip body is read', async () => {
    // fetch sends the bytes as they are (supertest would serialise a Buffer as JSON).
    const res = await fetch(`${live.url}/api/projects`, {
      method: 'POST',
      headers: {
        ...bearer(token),
        'Content-Type': 'application/json',
        'Content-Encoding': 'gzip',
      },
      body: gzipSync(JSON.stringify({ name: 'Compressed lab' })),
    })
    expect(res.status).toBe(201)
    expect((await res.json()).name).toBe('Compressed lab')
  })
})

describe('OME-XML the parser itself refuses', () => {
  const importXml = (xml: string) =>
    write('post', '/api/metadata/import').set('Content-Type', 'application/xml').send(xml)

  it('nesting too deep answers 400 with the reason', async () => {
    const deep = `<OME>${'<a>'.repeat(20_000)}${'</a>'.repeat(20_000)}</OME>`
    const res = await importXml(deep)
    expectCleanProblem(res, 400)
    expect(res.body.detail).toMatch(/nests elements too deeply/)
  })

  it.each(['__proto__', 'constructor'])(
    'an element named %s answers 400 with the reason',
    async (name) => {
      const res = await importXml(`<OME><${name}><polluted>1</polluted></${name}></OME>`)
      expectCleanProblem(res, 400)
      expect(res.body.detail).toContain(name)
    },
  )
})

describe('file names that display as something else', () => {
  it('loses bidirectional overrides and other invisible characters (Unicode Cf/Cc)', () => {
    // U+202E RIGHT-TO-LEFT OVERRIDE makes "report\u202Egnp.exe" display as "reportexe.png".
    expect(safeFileName('report\u202Egnp.exe')).toBe('reportgnp.exe')
    expect(safeFileName('a\u2066b\u2069c\u200Bd\uFEFFe\u00ADf.csv')).toBe('abcdef.csv')
    expect(safeFileName('line\u2028break.txt')).toBe('linebreak.txt')
  })

  it('an uploaded file keeps only the visible part of its name', async () => {
    const res = await tusUpload(`${live.url}/api/uploads`, token, Buffer.from('not a program'), {
      dataset: dataset.accession,
      filename: 'holiday\u202Egpj.exe',
    })
    const row = await t.em().findOneOrFail(DatasetFile, { id: Number(res.fileId) })
    expect(row.name).toBe('holidaygpj.exe')
  })
})

describe('searching with wildcard and full-text syntax characters', () => {
  it('reads them as word separators: words are found, syntax and wildcards never act', async () => {
    const em = t.em()
    const percent = await buildDataset(em, projectId, { title: 'Labelling at 100% efficiency' })
    const underscore = await buildDataset(em, projectId, { title: 'run_07 nuclear pores' })
    const plain = await buildDataset(em, projectId, { title: 'Run 07 nuclear pores' })
    const search = async (q: string) => {
      const res = await request(t.app)
        .get(`/api/datasets?q=${encodeURIComponent(q)}&limit=100`)
        .set(bearer(token))
      expect(res.status).toBe(200)
      return res.body.items.map((d: { accession: string }) => d.accession).sort()
    }

    expect(await search('100%')).toEqual([percent.accession])
    expect(await search('run_07')).toEqual([underscore.accession, plain.accession].sort())
    // Nothing but wildcards or punctuation: nothing to look for, so nothing is found.
    expect(await search('%')).toEqual([])
    expect(await search('_')).toEqual([])
    expect(await search('"*()^:')).toEqual([])
    // FTS5 operators are words like any other: OR does not widen, NEAR and column filters do nothing.
    expect(await search('efficiency OR pores')).toEqual([])
    expect(await search('title:efficiency')).toEqual([])
    expect(await search('NEAR(run 07)')).toEqual([])
    expect(await search('"efficiency')).toEqual([percent.accession])
  })
})

describe('guessing bearer tokens', () => {
  it('failed attempts are limited per address like sign-in; good tokens are never counted', async () => {
    for (let i = 0; i < 3; i++)
      expect((await request(t.app).get('/api/me').set(bearer(token))).status).toBe(200)
    const codes: number[] = []
    for (let i = 0; i < SIGN_IN_LIMIT + 2; i++)
      codes.push(
        (
          await request(t.app)
            .get('/api/me')
            .set(bearer(`guess-${i}`))
        ).status,
      )
    expect(codes.slice(0, SIGN_IN_LIMIT).every((c) => c === 401)).toBe(true)
    expect(codes.slice(SIGN_IN_LIMIT)).toEqual([429, 429])
    const limited = await request(t.app).get('/api/me').set(bearer('one-more-guess'))
    expectCleanProblem(limited, 429)
    // A token already accepted from this address goes on working; one never used before is, from
    // a limited address, just another guess: it cannot be told apart from a wrong one.
    expect((await request(t.app).get('/api/me').set(bearer(token))).status).toBe(200)
    const unused = await tokenFor(t.em(), await buildMember(t.em()))
    expectCleanProblem(await request(t.app).get('/api/me').set(bearer(unused)), 429)
  })
})

/**
 * GET /api/datasets beyond the first page: keyset cursors, deep offsets, full-text search, totals
 * kept per access version, and bad input that must end in a clear 400 or an empty page.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'
import { datasetSummarySchema } from '@shared/schemas/dataset.schema'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

interface ListItem {
  id: number
  accession: string
  title: string
}
interface ListPage {
  items: ListItem[]
  total: number
  nextCursor: string | null
}

let t: TestApp
let owner: string
let outsider: string
let projectId: number
const COUNT = 260
const WORDS = ['tubulin', 'clathrin', 'Nup96', 'épitope']

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const member = await buildMember(em)
  projectId = (await buildProject(em, [{ user: member, role: 'owner' }])).id
  owner = await tokenFor(em, member)
  outsider = await tokenFor(em, await buildMember(em))
  const base = Date.UTC(2026, 0, 1)
  for (let i = 0; i < COUNT; i++) {
    await buildDataset(em, projectId, {
      // Titles repeat, so the id must break ties for the keyset to be exact.
      title: `${WORDS[i % WORDS.length]} series ${i % 40}`,
      state: i % 3 ? 'draft' : 'approved',
      createdAt: new Date(base + (i % 50) * 60_000),
      complete: false,
    })
  }
  // One dataset at a time through the builders: a few seconds on SQLite, longer on PostgreSQL.
}, 90_000)
afterAll(() => t.close())

const get = (query: string, token = owner) =>
  request(t.app).get(`/api/datasets?projectId=${projectId}&${query}`).set(bearer(token))
const page = async (query: string, token = owner) => {
  const res = await get(query, token)
  expect(res.status, res.text).toBe(200)
  return res.body as ListPage
}
const ids = (p: ListPage) => p.items.map((d) => d.id)

/** The whole list by offsets of 200 (the largest page). */
async function byOffsets(query: string) {
  const first = await page(`${query}&limit=200&offset=0`)
  const rest = await page(`${query}&limit=200&offset=200`)
  return [...ids(first), ...ids(rest)]
}

/** The whole list by following nextCursor with pages of `limit`. */
async function byCursors(query: string, limit: number) {
  const seen: number[] = []
  let p = await page(`${query}&limit=${limit}`)
  for (;;) {
    seen.push(...ids(p))
    if (!p.nextCursor) return { seen, last: p }
    p = await page(`${query}&limit=${limit}&cursor=${encodeURIComponent(p.nextCursor)}`)
  }
}

describe('paging', () => {
  it.each(['title', '-title', '-createdAt', '-updatedAt', 'updatedAt', 'state', 'accession'])(
    'cursors walk sort %s exactly as offsets do, ties broken by id',
    async (sort) => {
      const expected = await byOffsets(`sort=${sort}`)
      expect(expected).toHaveLength(COUNT)
      expect(new Set(expected).size).toBe(COUNT)
      const { seen, last } = await byCursors(`sort=${sort}`, 37)
      expect(seen).toEqual(expected)
      expect(last.nextCursor).toBeNull()
      expect(last.total).toBe(COUNT)
    },
  )

  it('gives the same rows at a deep offset as the whole list does', async () => {
    const all = await byOffsets('sort=-createdAt')
    for (const offset of [199, 200, 233, 250]) {
      const p = await page(`sort=-createdAt&limit=25&offset=${offset}`)
      expect(ids(p)).toEqual(all.slice(offset, offset + 25))
      expect(p.total).toBe(COUNT)
    }
  })

  it('answers an offset past the end with an empty page and the total', async () => {
    for (const offset of [COUNT, COUNT + 1, 1e12]) {
      const p = await page(`sort=title&offset=${offset}`)
      expect(p).toEqual({ items: [], total: COUNT, nextCursor: null })
    }
  })

  it('keeps the total exact across changes (kept per access version, not recounted per page)', async () => {
    const before = (await page('limit=1')).total
    expect((await page('limit=1&offset=1')).total).toBe(before)
    const em = t.em()
    const added = await buildDataset(em, projectId, {
      title: 'Counted afterwards',
      complete: false,
    })
    expect((await page('limit=1')).total).toBe(before + 1)
    await request(t.app).delete(`/api/datasets/${added.id}`).set(bearer(owner)).expect(204)
    expect((await page('limit=1')).total).toBe(before)
  })

  it('lists summaries: every field of the dataset but its description, which its own answer has', async () => {
    const listed = await page('sort=title&limit=3')
    const strict = datasetSummarySchema.strict()
    for (const item of listed.items) expect(strict.safeParse(item).error).toBeUndefined()
    expect(listed.items[0]).not.toHaveProperty('description')
    const own = await request(t.app).get(`/api/datasets/${listed.items[0]!.id}`).set(bearer(owner))
    expect(own.body).toMatchObject({ ...listed.items[0], description: 'Built for a test' })
  })

  it('says in Server-Timing whether a page came from the cache', async () => {
    const first = await get('sort=title&limit=7&offset=3')
    expect(first.headers['server-timing']).toMatch(/^db;dur=\d+(\.\d+)?$/)
    const again = await get('sort=title&limit=7&offset=3')
    expect(again.headers['server-timing']).toBe('cache')
    expect(again.body).toEqual(first.body)
  })
})

describe('searching', () => {
  const search = async (q: string, token = owner) =>
    page(`q=${encodeURIComponent(q)}&limit=200`, token)

  it('finds every word, the end of each as a prefix, in any case and without accents', async () => {
    expect((await search('tubulin')).total).toBe(COUNT / WORDS.length)
    expect((await search('TUBU')).total).toBe(COUNT / WORDS.length)
    expect((await search('epitope')).total).toBe(COUNT / WORDS.length)
    // Dataset i is titled WORDS[i % 4] series (i % 40): i % 40 = 18 is always a Nup96.
    const both = await search('nup96 series 18')
    expect(both.total).toBe(7) // i = 18, 58, …, 258
    expect(both.items.every((d) => d.title === 'Nup96 series 18')).toBe(true)
    expect((await search('tubulin clathrin')).total).toBe(0)
  })

  it('finds accessions, whole or by their start', async () => {
    const [one] = (await page('sort=accession&limit=1')).items
    expect(ids(await search(one!.accession))).toEqual([one!.id])
    expect((await search(one!.accession.slice(0, -1))).total).toBeGreaterThanOrEqual(1)
  })

  it('finds only what the searcher may read', async () => {
    const approved = await search('tubulin', outsider)
    // Every third dataset is approved (public); the outsider sees those alone.
    const expected = (await byOffsets('q=tubulin&state=approved')).length
    expect(approved.total).toBe(expected)
    expect(approved.total).toBeLessThan((await search('tubulin')).total)
  })

  it('follows edits and deletions in the same transaction', async () => {
    const em = t.em()
    const d = await buildDataset(em, projectId, { title: 'Gephyrin clusters', complete: false })
    expect(ids(await search('gephyrin'))).toEqual([d.id])
    await request(t.app)
      .patch(`/api/datasets/${d.id}`)
      .set(bearer(owner))
      .send({ title: 'Homer1 scaffolds' })
      .expect(200)
    expect((await search('gephyrin')).total).toBe(0)
    expect(ids(await search('homer1 scaff'))).toEqual([d.id])
    await request(t.app).delete(`/api/datasets/${d.id}`).set(bearer(owner)).expect(204)
    expect((await search('homer1')).total).toBe(0)
  })

  it('pages a search by cursor and by deep offset alike', async () => {
    const all = await byOffsets('q=series&sort=-title')
    expect(all).toHaveLength(COUNT)
    expect((await byCursors('q=series&sort=-title', 60)).seen).toEqual(all)
    expect(ids(await page('q=series&sort=-title&limit=30&offset=215'))).toEqual(all.slice(215, 245))
  })

  it('answers a search of only stop words or punctuation with an empty page', async () => {
    for (const q of ['the', 'of the and', '--- ... ???', '*', '"', '()']) {
      expect(await search(q)).toEqual({ items: [], total: 0, nextCursor: null })
    }
  })
})

describe('a search matching more datasets than a sort of its own would be worth', () => {
  const BROAD = 2100 // more than GATHER_MAX_ROWS: the result is the list filtered by the match set
  let broadProject: number
  let broadOwner: string

  beforeAll(async () => {
    const em = t.em()
    const member = await buildMember(em)
    broadProject = (await buildProject(em, [{ user: member, role: 'owner' }])).id
    broadOwner = await tokenFor(em, member)
    const knex = em.getKnex()
    for (let start = 0; start < BROAD + 100; start += 500) {
      const n = Math.min(500, BROAD + 100 - start)
      await knex('dataset').insert(
        Array.from({ length: n }, (_, k) => {
          const i = start + k
          return {
            accession: `STPL-9${String(i).padStart(5, '0')}`,
            // The last hundred do not match; every seventh is public, the rest drafts.
            title: i < BROAD ? `Widefield ${i % 97} overview` : `Confocal ${i}`,
            description: '',
            project_id: broadProject,
            state: i % 7 ? 'draft' : 'approved',
            licence: 'CC-BY-4.0',
            version: 1,
            // Dates, not numbers: the driver writes each database's own form (ms on SQLite).
            created_at: new Date(Date.UTC(2026, 1, 1) + (i % 300) * 1000),
            updated_at: new Date(Date.UTC(2026, 1, 1) + i * 1000),
          }
        }),
      )
    }
  })

  it('pages and counts it as the keyset walk over the database does', async () => {
    const all = (q: string, token: string) =>
      request(t.app).get(`/api/datasets?q=widefield&${q}`).set(bearer(token))
    // An outsider sees the public seventh; the project's owner every matching dataset.
    for (const [token, expected] of [
      [outsider, Math.ceil(BROAD / 7)],
      [broadOwner, BROAD],
    ] as const) {
      const first = (await all('sort=-createdAt&limit=200', token)).body as ListPage
      expect(first.total).toBe(expected)
      const byOffset: number[] = []
      for (let offset = 0; offset < first.total; offset += 200)
        byOffset.push(...ids((await all(`sort=-createdAt&limit=200&offset=${offset}`, token)).body))
      const byCursor: number[] = []
      let p = first
      for (;;) {
        byCursor.push(...ids(p))
        if (!p.nextCursor) break
        p = (await all(`sort=-createdAt&limit=200&cursor=${p.nextCursor}`, token)).body
      }
      expect(byOffset).toHaveLength(first.total)
      expect(byOffset).toEqual(byCursor)
    }
  })
})

describe('bad input', () => {
  const expectProblem = (res: request.Response, pointer: string, words: RegExp) => {
    expect(res.status).toBe(400)
    expect(res.headers['content-type']).toContain(PROBLEM_CONTENT_TYPE)
    expect(res.body.errors).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ pointer, detail: expect.stringMatching(words) }),
      ]),
    )
    expect(res.text).not.toMatch(/select|sqlite|fts5|\.ts:/i)
  }

  it('refuses a 10 000-character search in words', async () => {
    expectProblem(await get(`q=${'tubulin '.repeat(1250)}`), '#/q', /at most 200 characters/)
  })

  it('refuses an unknown sort, naming the sorts there are', async () => {
    expectProblem(await get('sort=relevance'), '#/sort', /-updatedAt/)
    expectProblem(await get('sort=title;drop'), '#/sort', /sort must be one of/)
  })

  it('refuses a cursor that is not one, belongs to another sort, or comes with an offset', async () => {
    const { nextCursor } = await page('sort=title&limit=5')
    expectProblem(await get('sort=title&cursor=not-a-cursor'), '#/cursor', /Not a cursor/)
    const forged = Buffer.from(JSON.stringify(['title', 5, 1])).toString('base64url')
    expectProblem(await get(`sort=title&cursor=${forged}`), '#/cursor', /Not a cursor/)
    expectProblem(await get(`sort=-title&cursor=${nextCursor}`), '#/cursor', /sort "title"/)
    expectProblem(await get(`sort=title&offset=5&cursor=${nextCursor}`), '#/cursor', /not both/)
  })
})

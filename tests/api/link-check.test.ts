/**
 * The editors' link check: a statement mixing a public, an embargoed, a withdrawn, an unreleased
 * and an unknown accession, a link to this hub, a DOI and an unrelated URL. Each gets a verdict;
 * nothing beyond what the caller may read is told (an unreleased dataset reads as unknown to a
 * stranger); thousands pasted are refused with a clear message; the same result exports as CSV.
 */
import { parse } from 'csv-parse/sync'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { buildReviewerLink } from '../fixtures/review-builders'
import { createTestApp, TEST_ORIGIN, type TestApp } from '../fixtures/test-app'

let t: TestApp
let ownerToken: string
let strangerToken: string
const acc: Record<string, string> = {}
let statement: string

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const owner = await buildMember(em)
  const project = await buildProject(em, [{ user: owner, role: 'owner' }])
  ownerToken = await tokenFor(em, owner)
  strangerToken = await tokenFor(em, await buildMember(em))
  const make = async (
    name: string,
    state: 'approved' | 'withdrawn' | 'submitted',
    until?: Date,
  ) => {
    const d = await buildDataset(em, project.id, {
      state,
      embargoUntil: until ?? null,
      title: `The ${name} dataset`,
    })
    acc[name] = d.accession
    return d
  }
  const open = await make('public', 'approved')
  em.create(DatasetFile, {
    dataset: open.id,
    name: 'table.csv',
    size: 10,
    storageKey: 'k1',
    sha256: null,
    kind: 'other',
    status: 'processing',
  })
  await em.flush()
  const embargoed = await make('embargoed', 'approved', new Date(Date.UTC(2099, 5, 30)))
  await buildReviewerLink(em, t.config.sessionSecrets[0]!, embargoed.id)
  await make('withdrawn', 'withdrawn')
  await make('unreleased', 'submitted')
  statement = [
    `Data are available at Stipple under accession ${acc.public} (public)`,
    `and ${acc.embargoed!.toLowerCase()}, which will be released on publication;`,
    `see also ${TEST_ORIGIN}/datasets/${acc.withdrawn}. Raw data: ${acc.unreleased}, STPL-999999.`,
    `Code: https://example.org/code/repo. Preprint: doi:10.1101/2026.01.01.123456.`,
    `Again ${acc.public}.`,
  ].join(' ')
})
afterAll(() => t.close())

const check = (token: string, text: string, format = '') =>
  request(t.app).post(`/api/link-check${format}`).set(bearer(token)).send({ text })

describe('the link check', () => {
  it('reports each thing the statement names, once, in order, for the owner', async () => {
    const res = await check(ownerToken, statement)
    expect(res.status).toBe(200)
    const rows = res.body.items.map((i: Record<string, unknown>) => [
      i.input,
      i.verdict,
      i.phase,
      i.publicNow,
      i.embargoUntil,
      i.reviewerLink,
    ])
    expect(rows).toEqual([
      [acc.public, 'found', 'released', true, null, false],
      [acc.embargoed!.toLowerCase(), 'found', 'embargoed', false, '2099-06-30', true],
      [`${TEST_ORIGIN}/datasets/${acc.withdrawn}`, 'found', 'withdrawn', false, null, null],
      [acc.unreleased, 'found', 'submitted', false, null, false],
      ['STPL-999999', 'not_found', null, null, null, null],
      ['https://example.org/code/repo', 'unverifiable', null, null, null, null],
      ['10.1101/2026.01.01.123456', 'unverifiable', null, null, null, null],
    ])
    const open = res.body.items[0]
    // The file still being processed has no checksum yet; the others do.
    expect(open.files.total).toBe(open.files.withChecksum + 1)
    expect(open.completeness.requiredFilled).toBe(open.completeness.requiredTotal)
    expect(open.qualityReports).toEqual({ tables: 0, done: 0 })
  })

  it('tells a stranger no more than the public pages do', async () => {
    const res = await check(strangerToken, statement)
    const byInput = new Map(res.body.items.map((i: { input: string }) => [i.input, i]))
    const unreleased = byInput.get(acc.unreleased!) as Record<string, unknown>
    const unknown = byInput.get('STPL-999999') as Record<string, unknown>
    // An unreleased dataset reads exactly as an accession that does not exist.
    const { input: _a, accession: _b, ...unreleasedRest } = unreleased
    const { input: _c, accession: _d, ...unknownRest } = unknown
    expect(unreleasedRest).toEqual(unknownRest)
    expect(JSON.stringify(res.body)).not.toContain('The unreleased dataset')
    // Embargoed: the public landing facts, but no reviewer-link or file details.
    const embargoed = byInput.get(acc.embargoed!.toLowerCase()) as Record<string, unknown>
    expect(embargoed).toMatchObject({ verdict: 'found', phase: 'embargoed', reviewerLink: null })
    expect(embargoed.files).toBeNull()
    expect(embargoed.completeness).toBeNull()
  })

  it('exports the same result as CSV', async () => {
    const res = await check(ownerToken, statement, '?format=csv')
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toMatch(/^text\/csv/)
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="?link-check-\d{4}-\d{2}-\d{2}\.csv/,
    )
    const rows = parse(res.text, { columns: true }) as Record<string, string>[]
    expect(rows).toHaveLength(7)
    expect(rows[1]).toMatchObject({
      Accession: acc.embargoed,
      'Embargoed until': '2099-06-30',
      'Reviewer link': 'yes',
    })
  })

  it('refuses thousands of accessions with a clear message, and overlong text', async () => {
    const many = Array.from({ length: 1500 }, (_, i) => `STPL-${String(i + 1).padStart(6, '0')}`)
    const res = await check(ownerToken, many.slice(0, 1500).join(' ').slice(0, 19_000))
    expect(res.status).toBe(400)
    expect(res.body.detail).toMatch(/at most 100 at a time/)
    const long = await check(ownerToken, 'x'.repeat(20_001))
    expect(long.status).toBe(400)
    expect(JSON.stringify(long.body)).toMatch(/at most 20,000 characters/)
  })

  it('needs an account', async () => {
    const res = await request(t.app).post('/api/link-check').send({ text: acc.public })
    expect(res.status).toBe(401)
  })
})

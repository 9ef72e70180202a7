/**
 * Public landing pages /d/:accession, read as raw HTML the way a crawler or link checker does
 * (no browser, no script): schema.org Dataset JSON-LD in the head, citations that a separate
 * BibTeX parser reads back, and nothing about files or checksums on pages the public may not
 * see (embargoed, withdrawn, draft, unknown).
 */
import { parse as parseBibtex } from '@retorquere/bibtex-parser'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { IDataset } from '@server/modules/datasets/dataset.entity'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildReadyFile,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { buildReportedTable } from '../fixtures/reported-table'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { freezeVersion, startRevision } from '@server/modules/versions/versions.service'
import { LocalStorage } from '@server/storage/local-storage'
import { createTestApp, TEST_ORIGIN, type TestApp } from '../fixtures/test-app'

let t: TestApp
let released: IDataset
let embargoed: IDataset
let withdrawn: IDataset
let draft: IDataset
let projectId: number

/** A title with every character that means something in HTML, JSON in a script, BibTeX or SQL. */
const TRICKY_TITLE = 'Pores & rings <b>100%</b> of_all {NPC} </script>'
const SHA = 'a'.repeat(64)
const SHA_EMBARGOED = 'b'.repeat(64)
const SHA_WITHDRAWN = 'c'.repeat(64)

const addFile = (d: IDataset, name: string, sha256: string) =>
  buildReportedTable(t.em(), d.id, { name, size: 1_234_567, sha256, frcResolutionNm: 31.5 })

const get = (path: string) => request(t.app).get(path)

function jsonLdOf(html: string) {
  const scripts = [...html.matchAll(/<script type="application\/ld\+json">([\s\S]*?)<\/script>/g)]
  expect(scripts).toHaveLength(1)
  return JSON.parse(scripts[0]![1]!) as Record<string, unknown>
}

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const owner = await buildMember(em)
  const project = await buildProject(em, [{ user: owner, role: 'owner' }], 'Pore census')
  projectId = project.id
  released = await buildDataset(em, project.id, { state: 'approved', title: TRICKY_TITLE })
  released.approvedAt = new Date('2026-03-02T10:00:00Z')
  embargoed = await buildDataset(em, project.id, {
    state: 'approved',
    title: 'Embargoed pores',
    embargoUntil: new Date('2099-01-01T00:00:00Z'),
  })
  embargoed.approvedAt = new Date('2026-03-02T10:00:00Z')
  withdrawn = await buildDataset(em, project.id, { state: 'approved', title: 'Withdrawn pores' })
  withdrawn.approvedAt = new Date('2026-03-02T10:00:00Z')
  draft = await buildDataset(em, project.id, { state: 'draft', title: 'Secret draft pores' })
  await em.flush()
  await addFile(released, 'rings-open.csv', SHA)
  await addFile(embargoed, 'rings-embargoed.csv', SHA_EMBARGOED)
  await addFile(withdrawn, 'rings-withdrawn.csv', SHA_WITHDRAWN)
  await addFile(draft, 'rings-draft.csv', 'd'.repeat(64))
  // Withdrawn through the steward's real route, so the reason is where the product keeps it.
  const steward = await buildUser(em, { siteRole: 'steward' })
  const res = await request(t.app)
    .post(`/api/datasets/${withdrawn.accession}/review`)
    .set(bearer(await tokenFor(em, steward)))
    .send({ decision: 'withdraw', comment: 'Consent for two donors was revoked.' })
  expect(res.status).toBe(200)
})
afterAll(() => t.close())

describe('a public dataset', () => {
  it('is rendered on the server with title, authors, licence terms, files, checksums and quality', async () => {
    const res = await get(`/d/${released.accession}`)
    expect(res.status).toBe(200)
    expect(res.type).toBe('text/html')
    const html = res.text
    expect(html).toContain('Pores &amp; rings &lt;b&gt;100%&lt;/b&gt; of_all {NPC} &lt;/script&gt;')
    expect(html).not.toContain('<b>100%</b>')
    expect(html).toContain('Avery Tester')
    expect(html).toContain('Creative Commons Attribution 4.0')
    expect(html).toContain('rings-open.csv')
    expect(html).toContain(SHA)
    expect(html).toContain('1,234,567')
    expect(html).toContain(`/api/datasets/${released.accession}/files/`)
    expect(html).toContain('31.5 nm')
    expect(html).toContain(`href="/d/${released.accession}/v/1"`)
    expect(html).toContain(`href="${TEST_ORIGIN}/datasets/${released.accession}"`)
    expect(html).toContain(
      `are openly available in Stipple at ${TEST_ORIGIN}/d/${released.accession}/v/1 (accession ${released.accession}, version 1)`,
    )
  })

  // Google Search Central, "Dataset" structured data: required name and description (50–5000
  // characters); recommended identifier, license, creator (Person or Organization with a name),
  // distribution (DataDownload with contentUrl and encodingFormat), url, version, keywords,
  // isAccessibleForFree, includedInDataCatalog, funder, measurementTechnique (from memory).
  it('carries schema.org Dataset JSON-LD with the required and recommended properties', async () => {
    const ld = jsonLdOf((await get(`/d/${released.accession}`)).text)
    expect(ld['@context']).toBe('https://schema.org')
    expect(ld['@type']).toBe('Dataset')
    expect(ld.name).toBe(TRICKY_TITLE)
    expect(typeof ld.description).toBe('string')
    expect((ld.description as string).length).toBeGreaterThanOrEqual(50)
    expect((ld.description as string).length).toBeLessThanOrEqual(5000)
    expect(ld.identifier).toContain(released.accession)
    expect(ld.license).toBe('https://spdx.org/licenses/CC-BY-4.0.html')
    expect(ld.url).toBe(`${TEST_ORIGIN}/d/${released.accession}/v/1`)
    expect(ld.version).toBe('1')
    expect(ld.isAccessibleForFree).toBe(true)
    expect(ld.keywords).toEqual(['nuclear pore complex', 'dSTORM'])
    expect(ld.creator).toEqual([
      expect.objectContaining({ '@type': 'Person', name: 'Avery Tester' }),
    ])
    expect(ld.funder).toEqual([{ '@type': 'Organization', name: 'Example Research Council' }])
    expect(ld.includedInDataCatalog).toMatchObject({ '@type': 'DataCatalog', name: 'Stipple' })
    const downloads = ld.distribution as Record<string, unknown>[]
    expect(downloads.length).toBeGreaterThan(0)
    for (const d of downloads) {
      expect(d['@type']).toBe('DataDownload')
      expect(d.contentUrl).toMatch(
        new RegExp(`^${TEST_ORIGIN}/api/datasets/${released.accession}/files/\\d+/content$`),
      )
    }
    expect(downloads).toContainEqual(
      expect.objectContaining({ name: 'rings-open.csv', encodingFormat: 'text/csv' }),
    )
  })

  it('gives a BibTeX entry that a general BibTeX parser reads back', async () => {
    const res = await get(`/d/${released.accession}/v/1/cite.bib`)
    expect(res.status).toBe(200)
    expect(res.headers['content-disposition']).toContain(`${released.accession}-v1.bib`)
    const parsed = parseBibtex(res.text)
    expect(parsed.errors).toEqual([])
    expect(parsed.entries).toHaveLength(1)
    const entry = parsed.entries[0]!
    expect(entry.type).toBe('misc')
    expect(entry.fields.title).toBe(TRICKY_TITLE)
    expect(entry.fields.author).toEqual([{ firstName: 'Avery', lastName: 'Tester' }])
    expect(entry.fields.year).toBe('2026')
    expect(entry.fields.publisher).toEqual(['Stipple'])
    expect(entry.fields.url).toBe(`${TEST_ORIGIN}/d/${released.accession}/v/1`)
    // The same entry is shown on the page (escaped), with a plain-text reference.
    const page = (await get(`/d/${released.accession}`)).text
    expect(page).toContain('Tester, A. (2026).')
    expect(page).toContain('[Data set]. Stipple.')
  })

  it('gives RIS with the fields reference managers read', async () => {
    const res = await get(`/d/${released.accession}/v/1/cite.ris`)
    expect(res.status).toBe(200)
    const fields = res.text
      .split(/\r?\n/)
      .map((line) => /^([A-Z][A-Z0-9])  - ?(.*)$/.exec(line))
      .filter((m): m is RegExpExecArray => m !== null)
      .map((m) => [m[1], m[2]!.trim()])
    expect(fields[0]).toEqual(['TY', 'DATA'])
    expect(fields[fields.length - 1]).toEqual(['ER', ''])
    const field = (tag: string) => fields.filter(([t]) => t === tag).map(([, v]) => v)
    expect(field('AU')).toEqual(['Tester, Avery'])
    expect(field('TI')).toEqual([TRICKY_TITLE])
    expect(field('PY')).toEqual(['2026'])
    expect(field('PB')).toEqual(['Stipple'])
    expect(field('UR')).toEqual([`${TEST_ORIGIN}/d/${released.accession}/v/1`])
  })

  it('answers the same version under /v/1 and nothing under a version that does not exist', async () => {
    expect((await get(`/d/${released.accession}/v/1`)).status).toBe(200)
    expect((await get(`/d/${released.accession.toLowerCase()}/v/1`)).status).toBe(200)
    expect((await get(`/d/${released.accession}/v/2`)).status).toBe(404)
    expect((await get(`/d/${released.accession}/v/0`)).status).toBe(404)
    expect((await get(`/d/${released.accession}/v/1/cite.txt`)).status).toBe(404)
  })
})

describe('pages that must not leak', () => {
  it('shows an embargoed dataset as metadata, its embargo end and why there are no files', async () => {
    const res = await get(`/d/${embargoed.accession}`)
    expect(res.status).toBe(200)
    expect(res.text).toContain('Embargoed pores')
    expect(res.text).toContain('under embargo until 2099-01-01')
    expect(res.text).toContain('only its description is public')
    expect(res.text).toContain('will be openly available')
    expect(res.text).not.toContain('rings-embargoed.csv')
    expect(res.text).not.toContain(SHA_EMBARGOED)
    expect(res.text).not.toContain('/files/')
    expect(res.text).not.toContain('Quality at a glance')
    const ld = jsonLdOf(res.text)
    expect(ld.distribution).toEqual([])
  })

  it('keeps a tombstone with the reason for a withdrawn dataset, and no files', async () => {
    const res = await get(`/d/${withdrawn.accession}`)
    expect(res.status).toBe(200)
    expect(res.text).toContain('This dataset was withdrawn')
    expect(res.text).toContain('Consent for two donors was revoked.')
    expect(res.text).not.toContain('rings-withdrawn.csv')
    expect(res.text).not.toContain(SHA_WITHDRAWN)
    expect(res.text).not.toContain('application/ld+json')
    expect((await get(`/d/${withdrawn.accession}/v/1/cite.bib`)).status).toBe(404)
  })

  it('answers drafts, unknown and malformed accessions with one identical 404 page', async () => {
    const pages = await Promise.all(
      [
        `/d/${draft.accession}`,
        `/d/${draft.accession}/v/1`,
        `/d/${draft.accession}/v/1/cite.bib`,
        '/d/STPL-999999',
        `/d/${draft.id}`,
        '/d/%3Cscript%3E',
        `/d/${'x'.repeat(500)}`,
        `/d/${released.accession}/anything`,
      ].map((path) => get(path)),
    )
    for (const res of pages) {
      expect(res.status).toBe(404)
      expect(res.text).toBe(pages[0]!.text)
      expect(res.text).not.toContain('Secret draft')
      expect(res.text).not.toContain('rings-draft.csv')
      expect(res.text).not.toContain('d'.repeat(64))
    }
  })

  it('shows the public view even to someone who may read more', async () => {
    const owner = await buildMember(t.em())
    const project = await buildProject(t.em(), [{ user: owner, role: 'owner' }])
    const own = await buildDataset(t.em(), project.id, { state: 'submitted' })
    const res = await get(`/d/${own.accession}`).set(bearer(await tokenFor(t.em(), owner)))
    expect(res.status).toBe(404)
  })
})

describe('versions', () => {
  it('shows the frozen version: v1 stays public, as approved, while v2 is drafted', async () => {
    const em = t.em()
    const built = await buildDataset(em, projectId, { state: 'approved', title: 'Versioned pores' })
    const d = await em.findOneOrFail(Dataset, { id: built.id })
    const storage = new LocalStorage(t.config.dataDir)
    await buildReadyFile(em, d.id, { name: 'notes.txt', storage })
    await freezeVersion(em, storage, d, null, new Date('2026-05-01T09:00:00Z'))
    await em.flush()
    startRevision(d)
    d.title = 'Versioned pores, second take'
    await em.flush()

    const res = await get(`/d/${d.accession}`)
    expect(res.status).toBe(200)
    expect(res.text).toContain('Versioned pores')
    expect(res.text).not.toContain('second take')
    expect(res.text).toContain('2026-05-01')
    expect(res.text).toContain('notes.txt')
    const ld = jsonLdOf(res.text)
    expect(ld).toMatchObject({ name: 'Versioned pores', version: '1' })
    expect((await get(`/d/${d.accession}/v/1`)).status).toBe(200)
    expect((await get(`/d/${d.accession}/v/2`)).status).toBe(404)
  })
})

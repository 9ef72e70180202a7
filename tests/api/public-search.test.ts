/**
 * The public search (GET /api/search) over a hand-built catalogue: full text reaches metadata
 * terms through dataset_fts, facets count what each choice would give, drafts and withdrawn
 * datasets never appear, an embargo hides quality numbers, and typed punctuation, stop words or
 * a huge query give an empty page or a clear 400, never the whole catalogue.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it, onTestFinished } from 'vitest'
import { metadataSchema } from '@shared/metadata/metadata.schema'
import type { PublicSearchPage } from '@shared/schemas/public-search.schema'
import { databaseDriver, openDatabase } from '@server/db'
import { Dataset, type IDataset } from '@server/modules/datasets/dataset.entity'
import { DatasetMetadata } from '@server/modules/metadata/dataset-metadata.entity'
import { MATCHED, ROWS_SQL } from '@server/modules/search/public-search.service'
import { searchExpression } from '@server/modules/datasets/dataset-search'
import { buildReportedTable } from '../fixtures/reported-table'
import { buildDataset, buildMember, buildProject } from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp

interface Fixture {
  title: string
  state?: 'approved' | 'draft' | 'withdrawn'
  approved: string
  embargoUntil?: string
  technique: 'dSTORM' | 'PALM' | 'DNA-PAINT'
  structure: string
  organism: string
  probes: ('organic dye' | 'DNA-PAINT imager' | 'photoactivatable or photoconvertible protein')[]
  microscope?: string
  frcNm?: number
}

/** The catalogue, written out by hand; the expected counts below are read off this table. */
const CATALOGUE: Record<string, Fixture> = {
  poresMouse: {
    title: 'Pore scaffold in mouse fibroblasts',
    approved: '2025-06-01',
    technique: 'dSTORM',
    structure: 'nuclear pore complex',
    organism: 'Mus musculus',
    probes: ['organic dye'],
    microscope: 'Heliotrope custom TIRF stand',
    frcNm: 18,
  },
  adhesions: {
    title: 'Adhesion plaques, 100% of_cells imaged',
    approved: '2026-02-01',
    technique: 'PALM',
    structure: 'focal adhesion',
    organism: 'Homo sapiens',
    probes: ['photoactivatable or photoconvertible protein'],
    frcNm: 35,
  },
  poresPaint: {
    title: 'Two-colour pores by exchange imaging',
    approved: '2026-03-01',
    technique: 'DNA-PAINT',
    structure: 'nuclear pore complex',
    organism: 'Mus musculus',
    probes: ['DNA-PAINT imager', 'organic dye'],
  },
  embargoed: {
    title: 'Microtubule lattice under embargo',
    approved: '2026-04-01',
    embargoUntil: '2099-01-01',
    technique: 'dSTORM',
    structure: 'microtubules',
    organism: 'Homo sapiens',
    probes: ['organic dye'],
    frcNm: 12,
  },
  draft: {
    title: 'Secret pore draft',
    state: 'draft',
    approved: '2026-01-01',
    technique: 'dSTORM',
    structure: 'nuclear pore complex',
    organism: 'Mus musculus',
    probes: ['organic dye'],
  },
  withdrawn: {
    title: 'Withdrawn pore series',
    state: 'withdrawn',
    approved: '2025-01-01',
    technique: 'dSTORM',
    structure: 'nuclear pore complex',
    organism: 'Mus musculus',
    probes: ['organic dye'],
  },
}
const accessions: Record<string, string> = {}

async function build(projectId: number, f: Fixture): Promise<IDataset> {
  const em = t.em()
  const d = await buildDataset(em, projectId, {
    state: f.state ?? 'approved',
    title: f.title,
    embargoUntil: f.embargoUntil ? new Date(`${f.embargoUntil}T00:00:00Z`) : null,
  })
  const row = await em.findOneOrFail(Dataset, { id: d.id })
  row.approvedAt = new Date(`${f.approved}T12:00:00Z`)
  row.description = 'Localizations of one labelled structure.'
  const doc = completeMetadata()
  doc.study!.keywords = []
  doc.acquisition!.technique = f.technique
  doc.biosample!.structure = f.structure
  doc.biosample!.organism = { name: f.organism }
  doc.biosample!.cellType = undefined
  doc.biosample!.cellLine = undefined
  doc.instrument!.microscopeModel = f.microscope
  doc.labelling = f.probes.map((probeClass, i) => ({
    ...doc.labelling![0]!,
    target: `T${i}`,
    probeClass,
  }))
  const meta = await em.findOneOrFail(DatasetMetadata, { dataset: d.id })
  meta.document = metadataSchema.parse(doc)
  await em.flush()
  if (f.frcNm !== undefined)
    await buildReportedTable(em, d.id, { name: `${d.accession}.csv`, frcResolutionNm: f.frcNm })
  return d
}

async function search(query: Record<string, string | number> = {}) {
  const res = await request(t.app).get('/api/search').query(query)
  expect(res.status).toBe(200)
  return res.body as PublicSearchPage
}
const titles = (page: PublicSearchPage) => page.items.map((i) => i.title).sort()
const count = (page: PublicSearchPage, facet: keyof PublicSearchPage['facets'], value: string) =>
  page.facets[facet].find((f) => f.value === value)?.count ?? 0

beforeAll(async () => {
  t = await createTestApp()
  const owner = await buildMember(t.em())
  const project = await buildProject(t.em(), [{ user: owner, role: 'owner' }])
  for (const [key, f] of Object.entries(CATALOGUE))
    accessions[key] = (await build(project.id, f)).accession
})
afterAll(() => t.close())

describe('public search', () => {
  it('lists approved datasets only (public and under embargo), newest first', async () => {
    const page = await search()
    expect(page.total).toBe(4)
    expect(page.items.map((i) => i.accession)).toEqual([
      accessions.embargoed, // becomes public in 2099
      accessions.poresPaint,
      accessions.adhesions,
      accessions.poresMouse,
    ])
  })

  it('counts every facet over the hand-built catalogue', async () => {
    const page = await search()
    expect(page.facets.technique).toEqual([
      { value: 'dSTORM', count: 2 },
      { value: 'DNA-PAINT', count: 1 },
      { value: 'PALM', count: 1 },
    ])
    expect(count(page, 'structure', 'nuclear pore complex')).toBe(2)
    expect(count(page, 'organism', 'Homo sapiens')).toBe(2)
    expect(count(page, 'organism', 'Mus musculus')).toBe(2)
    expect(count(page, 'probeClass', 'organic dye')).toBe(3)
    expect(count(page, 'probeClass', 'DNA-PAINT imager')).toBe(1)
    // The embargoed dataset's 12 nm stays hidden: only the released 18 and 35 nm count.
    expect(page.facets.frcRange).toEqual([
      { value: 'under-20', count: 1 },
      { value: '20-40', count: 1 },
    ])
    expect(page.facets.year).toEqual([
      { value: '2099', count: 1 },
      { value: '2026', count: 2 },
      { value: '2025', count: 1 },
    ])
    const embargoed = page.items.find((i) => i.accession === accessions.embargoed)!
    expect(embargoed.frcResolutionNm).toBeNull()
    expect(embargoed.embargoUntil).toBe('2099-01-01')
  })

  it('narrows by a facet and counts each facet over the other choices', async () => {
    const page = await search({ organism: 'mus musculus' })
    expect(titles(page)).toEqual([CATALOGUE.poresMouse!.title, CATALOGUE.poresPaint!.title].sort())
    // The organism facet still offers the other organism with what it would give.
    expect(count(page, 'organism', 'Homo sapiens')).toBe(2)
    expect(page.facets.technique).toEqual([
      { value: 'DNA-PAINT', count: 1 },
      { value: 'dSTORM', count: 1 },
    ])
    const both = await search({ organism: 'Mus musculus', probeClass: 'DNA-PAINT imager' })
    expect(titles(both)).toEqual([CATALOGUE.poresPaint!.title])
    expect((await search({ frcRange: 'under-20' })).items.map((i) => i.accession)).toEqual([
      accessions.poresMouse,
    ])
    expect((await search({ year: 2026 })).total).toBe(2)
  })

  it('finds metadata terms, not only titles', async () => {
    expect(titles(await search({ q: 'Heliotrope' }))).toEqual([CATALOGUE.poresMouse!.title])
    expect(titles(await search({ q: 'focal adhesion' }))).toEqual([CATALOGUE.adhesions!.title])
    expect((await search({ q: 'nuclear pore' })).total).toBe(2)
    expect((await search({ q: 'sapiens microtub' })).total).toBe(1)
    // The draft and the withdrawn dataset match the words but are never listed.
    expect(titles(await search({ q: 'pore' }))).not.toContain(CATALOGUE.draft!.title)
    expect(titles(await search({ q: 'series' }))).toEqual([])
  })

  it('follows a metadata edit in the index', async () => {
    const em = t.em()
    const d = await em.findOneOrFail(Dataset, { accession: accessions.adhesions })
    const meta = await em.findOneOrFail(DatasetMetadata, { dataset: d.id })
    meta.document = {
      ...meta.document,
      biosample: { ...meta.document.biosample, structure: 'podosome' },
    }
    await em.flush()
    expect((await search({ q: 'podosome' })).total).toBe(1)
    expect((await search({ q: 'focal adhesion' })).total).toBe(0)
  })

  it('sorts by title and by accession', async () => {
    const byTitle = await search({ sort: 'title' })
    expect(byTitle.items.map((i) => i.title)).toEqual(
      byTitle.items.map((i) => i.title).sort((a, b) => a.localeCompare(b, 'en')),
    )
    const byAccession = await search({ sort: 'accession', limit: 2, offset: 2 })
    expect(byAccession.total).toBe(4)
    expect(byAccession.items.map((i) => i.accession)).toEqual(
      Object.values(accessions)
        .filter((a) => a !== accessions.draft && a !== accessions.withdrawn)
        .sort()
        .slice(2, 4),
    )
  })

  it('reads % and _ as text: alone they find nothing, beside a word they do not widen it', async () => {
    for (const q of ['%', '_', '%%', '_%_', "' or 1=1 --", '"', '*', 'NEAR(']) {
      const page = await search({ q })
      expect(page.total, q).toBe(0)
      expect(page.items).toEqual([])
    }
    expect(titles(await search({ q: '100%' }))).toEqual([CATALOGUE.adhesions!.title])
    expect(titles(await search({ q: 'of_cells' }))).toEqual([CATALOGUE.adhesions!.title])
  })

  it('answers stop words only with an empty page and a huge query with a clear 400', async () => {
    expect((await search({ q: 'the of and' })).total).toBe(0)
    const res = await request(t.app)
      .get('/api/search')
      .query({ q: 'x'.repeat(10_000) })
    expect(res.status).toBe(400)
    expect(res.type).toBe('application/problem+json')
    expect(JSON.stringify(res.body)).toContain('at most 200 characters')
    const bad = await request(t.app).get('/api/search').query({ frcRange: 'tiny', limit: 5000 })
    expect(bad.status).toBe(400)
  })

  it('reads approved datasets through an index, never by scanning the dataset table', async () => {
    // SQLite's plan of SQLite's statements, on the PostgreSQL profile too (its own plans, which
    // need thousands of rows to mean anything, are in datasets-query-plan-pg.test.ts).
    const sqlite = databaseDriver(t.orm) === 'sqlite' ? null : await openDatabase(':memory:')
    const connection = (sqlite ?? t.orm).em.fork().getConnection()
    onTestFinished(() => sqlite?.close())
    for (const [sql, params] of [
      [ROWS_SQL, []],
      [ROWS_SQL + MATCHED, [searchExpression('pore')]],
    ] as const) {
      const plan = await connection.execute<{ detail: string }[]>(`explain query plan ${sql}`, [
        ...params,
      ])
      const details = plan.map((p) => p.detail)
      expect(
        details.some((d) => /SCAN d\b/.test(d)),
        details.join('\n'),
      ).toBe(false)
      expect(
        details.some((d) =>
          /SEARCH d USING (COVERING )?INDEX|SEARCH d USING INTEGER PRIMARY KEY/.test(d),
        ),
      ).toBe(true)
    }
  })
})

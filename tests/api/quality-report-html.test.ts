/**
 * The quality report as a standalone HTML file: the same numbers as the JSON report, plots drawn
 * as SVG on the server, the whole field as an embedded PNG, nothing fetched from anywhere, user
 * text escaped, and the same authorisation as the JSON route.
 */
import { parseDocument } from 'htmlparser2'
import type { ChildNode, Element } from 'domhandler'
import request from 'supertest'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'
import type { QualityReportDto } from '@shared/schemas/quality.schema'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { QualityReport } from '@server/modules/quality/quality-report.entity'
import { bearer } from '../fixtures/builders'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp
let fileId: number
let report: QualityReportDto
const HOSTILE_TITLE = 'Actin <script>alert("owned")</script> & <img src=x onerror=alert(1)>'

const base = () => `/api/datasets/${app.dataset.accession}/files/${fileId}`
const get = (path: string, who?: string) => {
  const req = request(app.t.app).get(`${base()}${path}`)
  return who ? req.set(bearer(app.tokens[who]!)) : req
}

beforeAll(async () => {
  app = await startSharedDraftApp({ previewer: ['preview'], reader: [] })
  await app.t.em().nativeUpdate(Dataset, { id: app.dataset.id }, { title: HOSTILE_TITLE })
  const { localizations } = simulateLocalizations({
    seed: 11,
    fieldNm: 4000,
    emitters: 2500,
    frames: 1500,
    structure: { kind: 'filaments', count: 5 },
    blinking: { mode: 'bursts', meanBursts: 2, meanBurstFrames: 2 },
    precision: { mode: 'fixed', sigmaNm: 10 },
  })
  fileId = await app.upload('fibres.csv', Buffer.from(localizationsToCsv(localizations)))
  const end = Date.now() + 90_000
  for (;;) {
    report = (await get('/quality', 'member')).body
    if (report.status === 'done' || report.status === 'failed') break
    if (Date.now() > end) throw new Error(`report still ${report.status}`)
    await new Promise((r) => setTimeout(r, 200))
  }
  expect(report.status).toBe('done')
}, 120_000)
afterAll(() => app.close())

const isElement = (n: ChildNode): n is Element =>
  n.type === 'tag' || n.type === 'script' || n.type === 'style'
function elements(nodes: ChildNode[]): Element[] {
  return nodes.flatMap((n) => (isElement(n) ? [n, ...elements(n.children)] : []))
}
const textOf = (n: ChildNode): string =>
  n.type === 'text' ? n.data : isElement(n) ? n.children.map(textOf).join('') : ''
const squash = (s: string) => s.replace(/\s+/g, ' ').trim()

describe('the downloadable HTML report', () => {
  let page: string
  let all: Element[]
  const find = (test: (e: Element) => boolean) => all.filter(test)
  const byAttr = (name: string, value: string) => find((e) => e.attribs[name] === value)

  beforeAll(async () => {
    const res = await get('/quality/report.html', 'member')
    expect(res.status).toBe(200)
    page = res.text
    all = elements(parseDocument(page).children)
  }, 60_000)

  it('is an HTML attachment named after the accession and the table', async () => {
    const res = await get('/quality/report.html', 'member')
    expect(res.headers['content-type']).toMatch(/^text\/html; charset=utf-8/)
    // A name of plain characters needs no quotes (RFC 6266); either form names the same file.
    expect(res.headers['content-disposition']).toMatch(
      new RegExp(`^attachment; filename="?${app.dataset.accession}-fibres-quality\\.html"?$`),
    )
    expect(page.startsWith('<!doctype html>')).toBe(true)
  })

  it('names the dataset and the file, with the title escaped rather than run', () => {
    expect(find((e) => e.name === 'script')).toEqual([])
    expect(find((e) => e.name === 'img' && e.attribs.src === 'x')).toEqual([])
    expect(page).toContain('&lt;script&gt;alert(&quot;owned&quot;)&lt;/script&gt;')
    expect(squash(textOf(byAttr('data-fact', 'dataset')[0]!))).toBe(
      `${app.dataset.accession} · ${HOSTILE_TITLE}`,
    )
    expect(squash(textOf(byAttr('data-fact', 'file')[0]!))).toBe('fibres.csv')
  })

  it('lists every metric of the JSON report with its values, method, parameters or reason', () => {
    for (const [key, metric] of Object.entries(report.metrics)) {
      const [article] = byAttr('data-metric', key)
      expect(article, key).toBeDefined()
      const text = squash(textOf(article!))
      expect(text).toContain(squash(metric.method))
      if (metric.value === null) expect(text).toContain(metric.reason)
      const inside = elements(article!.children)
      // Every plain number of the value appears with exactly the JSON's value.
      const value = metric.value
      const numbers =
        typeof value === 'number'
          ? [['value', value] as const]
          : value && typeof value === 'object'
            ? Object.entries(value).filter(([, v]) => typeof v === 'number')
            : []
      for (const [name, v] of numbers) {
        const cell = inside.find((e) => e.attribs['data-field'] === name)
        expect(cell?.attribs['data-value'], `${key}.${name}`).toBe(String(v))
      }
      for (const name of Object.keys(metric.parameters))
        expect(
          inside.some((e) => e.attribs['data-parameter'] === name),
          `${key} ${name}`,
        ).toBe(true)
    }
  })

  it('shows the headline numbers as the JSON report has them', () => {
    const cards = squash(textOf(find((e) => e.attribs.class === 'cards')[0]!))
    // Counts with digit grouping, lengths to one decimal (the page's number formats).
    expect(cards).toContain(new Intl.NumberFormat().format(report.localizations!))
    const nm = new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 })
    expect(cards).toContain(`${nm.format(report.precisionMedianNm!)} nm (median)`)
    expect(cards).toContain(`${nm.format(report.frcResolutionNm!)} nm`)
    expect(cards).toContain(`up to ${nm.format(report.driftNm!)} nm`)
    // The verdicts in words, each with its tone named.
    const verdicts = find((e) => e.attribs.class === 'verdict')
    expect(verdicts.length).toBeGreaterThan(0)
    for (const v of verdicts)
      expect(squash(textOf(v))).toMatch(/^(Good|Note|Worth a look|A problem) \w/)
  })

  it('draws the plots as inline SVG and the whole field as an embedded PNG', async () => {
    expect(page).toContain('<svg')
    const plots = find((e) => e.name === 'figure' && e.attribs.class === 'plot')
    expect(plots.map((p) => p.attribs['data-plot'])).toEqual(
      expect.arrayContaining(['photons', 'precision', 'frc', 'drift']),
    )
    for (const plot of plots) {
      const svg = elements(plot.children).filter((e) => e.name === 'svg')
      expect(svg).toHaveLength(1)
      // Well-formed markup: a quote inside a style would leave stray attribute names behind.
      for (const e of elements(svg))
        for (const name of Object.keys(e.attribs)) expect(name).toMatch(/^[a-z][\w:-]*$/i)
    }
    const [img] = find((e) => e.name === 'img')
    const match = /^data:image\/png;base64,(.+)$/.exec(img!.attribs.src ?? '')
    expect(match).not.toBeNull()
    const png = Buffer.from(match![1]!, 'base64')
    const meta = await sharp(png).metadata()
    expect(meta.format).toBe('png')
    expect([String(meta.width), String(meta.height)]).toEqual([
      img!.attribs.width,
      img!.attribs.height,
    ])
    // The data's bounding box (the preview's description), not the pyramid's larger square, and
    // big enough to see: at least 256 px across.
    const { boundsNm } = (await get('/preview', 'member')).body
    const aspect = (boundsNm.xMax - boundsNm.xMin) / (boundsNm.yMax - boundsNm.yMin)
    expect(meta.width! / meta.height!).toBeCloseTo(aspect, 1)
    expect(Math.max(meta.width!, meta.height!)).toBeGreaterThanOrEqual(256)
    // Localizations were drawn: some pixels are not black.
    const { channels } = await sharp(png).stats()
    expect(Math.max(...channels.slice(0, 3).map((c) => c.max))).toBeGreaterThan(0)
  })

  it('asks for nothing from elsewhere: no http(s) address in src, href or url()', () => {
    const remote = /^\s*(https?:)?\/\//i
    const urlRefs = /url\(\s*['"]?\s*(https?:)?\/\//i
    const linking = [
      'src',
      'href',
      'xlink:href',
      'srcset',
      'poster',
      'action',
      'data',
      'background',
    ]
    for (const e of all) {
      for (const name of linking)
        if (e.attribs[name] !== undefined)
          expect(e.attribs[name], `${e.name} ${name}`).not.toMatch(remote)
      if (e.attribs.style) expect(e.attribs.style).not.toMatch(urlRefs)
      for (const [name, value] of Object.entries(e.attribs))
        if (/^url\(/i.test(value)) expect(value, name).not.toMatch(urlRefs)
    }
    for (const style of find((e) => e.name === 'style')) expect(textOf(style)).not.toMatch(urlRefs)
    expect(find((e) => e.name === 'link' || e.name === 'iframe' || e.name === 'object')).toEqual([])
  })
})

describe('who may download it', () => {
  it('follows the preview right like the JSON report', async () => {
    expect((await get('/quality/report.html', 'previewer')).status).toBe(200)
    const refused = await get('/quality/report.html', 'reader')
    expect(refused.status).toBe(403)
    expect(refused.headers['content-type']).toContain(PROBLEM_CONTENT_TYPE)
    expect((await get('/quality/report.html', 'outsider')).status).toBe(404)
    expect((await get('/quality/report.html')).status).toBe(404)
  })

  it('answers a problem, not a page, while the report is not done', async () => {
    await app.t.em().nativeDelete(QualityReport, { file: fileId })
    expect((await get('/quality', 'member')).body.status).not.toBe('done')
    const res = await get('/quality/report.html', 'member')
    expect(res.status).toBe(404)
    expect(res.headers['content-type']).toContain(PROBLEM_CONTENT_TYPE)
    expect(res.body.detail).toMatch(/not finished/)
    expect(res.headers['content-disposition']).toBeUndefined()
  })
})

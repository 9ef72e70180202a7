/**
 * In a real browser against the real server with the demo data: a visitor who is not signed in
 * opens a public dataset, follows "Quality and preview" from its files, and sees the report's
 * cards and preview tiles rendered by the server; changing the colormap asks for new tiles.
 */
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RunningStipple } from '@server/start'
import { startE2eSession, type E2eSession } from './e2e-session'
import { pickOption } from './pages/select-option'

let session: E2eSession
let stipple: RunningStipple
let page: Page
let consoleErrors: string[]

beforeAll(async () => {
  session = await startE2eSession({ demoTables: true })
  ;({ stipple, page, consoleErrors } = session)
})
afterAll(() => session?.close())

const TITLE = 'Nup96 dSTORM, U2OS cells, bottom nuclear envelope'
const json = async <T>(path: string): Promise<T> =>
  (await (await fetch(`${stipple.url}${path}`)).json()) as T

/** The demo table of the public dataset, once its quality report is done (computed after start). */
async function demoTableReady(): Promise<{ accession: string; fileId: number }> {
  const found = await json<{ items: { accession: string; title: string }[] }>(
    `/api/datasets?q=${encodeURIComponent('Nup96 dSTORM')}`,
  )
  const accession = found.items.find((d) => d.title === TITLE)!.accession
  const end = Date.now() + 240_000
  for (;;) {
    const files = await json<{ items: { id: number; status: string }[] }>(
      `/api/datasets/${accession}/files`,
    )
    const file = files.items[0]
    if (file?.status === 'ready') {
      const report = await json<{ status: string }>(
        `/api/datasets/${accession}/files/${file.id}/quality`,
      )
      if (report.status === 'done') return { accession, fileId: file.id }
    }
    if (Date.now() > end) throw new Error('the demo table was not reported on in time')
    await new Promise((r) => setTimeout(r, 1000))
  }
}

/**
 * Every tile request of the page: asked, answered (with status) or failed, and when; `drawn`
 * holds the addresses of the tiles answered 200.
 */
function tileTraffic(page: Page) {
  const started = Date.now()
  const log = new Map<string, string>()
  const drawn: string[] = []
  const note = (url: string, what: string) => {
    const tile = url.split('/tiles/')[1]
    if (!tile) return
    const seconds = ((Date.now() - started) / 1000).toFixed(1)
    log.set(tile, [log.get(tile), `${what} ${seconds} s`].filter(Boolean).join(', '))
  }
  page.on('request', (r) => note(r.url(), 'asked'))
  page.on('response', (r) => {
    note(r.url(), String(r.status()))
    if (r.url().includes('/tiles/') && r.status() === 200) drawn.push(r.url())
  })
  page.on('requestfinished', (r) => note(r.url(), 'finished'))
  page.on('requestfailed', (r) => note(r.url(), `failed (${r.failure()?.errorText})`))
  return { drawn, summary: () => [...log].map(([t, what]) => `${t}: ${what}`).join('\n') }
}

describe('the quality page of a public dataset', () => {
  it('shows the report and server-rendered tiles, and redraws with another colormap', async () => {
    const { accession, fileId } = await demoTableReady()
    const traffic = tileTraffic(page)
    const tiles = traffic.drawn
    await page.goto(`${stipple.url}/datasets/${accession}`)
    await page.getByRole('tab', { name: 'Files' }).click()
    await page
      .getByRole('link', { name: /Quality and preview/ })
      .first()
      .click()
    await page.waitForURL(new RegExp(`/files/${fileId}$`))

    await expect.poll(() => page.getByText('Resolution (FRC)').count()).toBeGreaterThan(0)
    await expect.poll(() => page.getByText('Localization precision').count()).toBeGreaterThan(0)
    await expect.poll(() => tiles.length, { timeout: 90_000 }).toBeGreaterThan(0)
    expect(tiles.every((url) => !url.includes('colormap=grayscale'))).toBe(true)

    // As a person does: open the select by its field, then pick the option.
    const colormap = page.locator('.v-select', { has: page.getByLabel('Colormap') })
    await pickOption(page, colormap, 'Grayscale')
    await expect
      .poll(() => tiles.some((url) => url.includes('colormap=grayscale')), {
        timeout: 90_000,
        message: 'no grayscale tile arrived',
      })
      .toBe(true)
      .catch(async (error: Error) => {
        // What the browser asked for and what became of it, to tell a request never made from
        // one the server never answered.
        const shown = await colormap.innerText()
        throw new Error(`${error.message}\nColormap field: ${shown}\n${traffic.summary()}`)
      })
    expect(consoleErrors).toEqual([])
  }, 420_000) // the demo table may still be read and reported on (up to 4 min) when it starts
})

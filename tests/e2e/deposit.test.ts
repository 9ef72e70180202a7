/**
 * In a real browser (headless Debian chromium) against the real server with the demo data: a
 * depositor signs in through the local OpenID provider, creates a dataset, finds it in the
 * datasets table and signs out.
 */
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RunningStipple } from '@server/start'
import { signInAs, startE2eSession, type E2eSession } from './e2e-session'
import { DatasetCreatePage, DatasetsPage } from './pages/datasets.page'

let session: E2eSession
let stipple: RunningStipple
let page: Page
let consoleErrors: string[]

beforeAll(async () => {
  session = await startE2eSession()
  ;({ stipple, page, consoleErrors } = session)
})
afterAll(() => session?.close())

describe('a depositor in the browser', () => {
  it('signs in, creates a dataset, sees it in the table and signs out', async () => {
    await signInAs(session)
    await expect.poll(() => page.getByTestId('user-name').textContent()).toContain('Kasimir Feld')

    const title = `Clathrin lattice DNA-PAINT ${Date.now()}`
    await page.goto(`${stipple.url}/datasets/new`)
    await page
      .locator('.v-select', { has: page.getByLabel('Project') })
      .locator('.v-field')
      .click()
    await page.getByRole('option', { name: 'Nuclear pore scaffold census' }).click()
    await new DatasetCreatePage(page).create({ title, description: 'Made by the browser test.' })
    await page.waitForURL(/\/datasets\/STPL-\d{6}$/)
    const accession = (await page.getByTestId('accession').textContent())?.trim()
    expect(accession).toMatch(/^STPL-\d{6}$/)

    await page.goto(`${stipple.url}/datasets`)
    const datasets = new DatasetsPage(page)
    await datasets.search('Clathrin lattice')
    await expect.poll(() => datasets.table().textContent(), { timeout: 10_000 }).toContain(title)
    expect(await datasets.table().textContent()).toContain(accession!)

    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(`${stipple.url}/`)
    await expect
      .poll(() => page.getByRole('button', { name: 'Sign in' }).count())
      .toBeGreaterThan(0)
    const me = await page.evaluate(() => fetch('/api/me').then((r) => r.json()))
    expect(me.user).toBeNull()
    expect(consoleErrors).toEqual([])
  })
})

/**
 * In a real browser against the real server with the demo data: a depositor opens the describe
 * page of their draft, fills objective fields, sees the completeness rise and the draft saved,
 * and finds the values again after reloading the page.
 */
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RunningStipple } from '@server/start'
import { demoDraft, signInAs, startE2eSession, type E2eSession } from './e2e-session'
import { MetadataFormPage } from './pages/metadata-form.page'

let session: E2eSession
let stipple: RunningStipple
let page: Page
let consoleErrors: string[]

beforeAll(async () => {
  session = await startE2eSession()
  ;({ stipple, page, consoleErrors } = session)
})
afterAll(() => session?.close())

describe('a depositor describing a draft in the browser', () => {
  it('fills objective fields, sees completeness rise, and finds them saved after a reload', async () => {
    await signInAs(session)

    const draft = await demoDraft(page)
    expect(draft?.state).toBe('draft')
    await page.goto(`${stipple.url}/datasets/${draft.accession}`)
    await page.getByRole('toolbar').getByRole('link', { name: 'Describe' }).click()
    await page.waitForURL(/\/describe$/)

    const form = new MetadataFormPage(page)
    await expect.poll(() => form.score()).toBeGreaterThan(0)
    const before = await form.score()
    await form.openSection('Instrument')
    await form.fill('Numerical aperture (NA)', '1.49')
    await form.fill('Nominal magnification', '100')
    await form.choose('Immersion', 'Oil')
    await expect.poll(() => form.score()).toBeGreaterThan(before)
    const after = await form.score()
    await expect.poll(() => form.saveStatus(), { timeout: 10_000 }).toMatch(/^Saved/)

    await page.reload()
    await expect.poll(() => form.score()).toBe(after)
    await form.openSection('Instrument')
    expect(await form.field('Numerical aperture (NA)').inputValue()).toBe('1.49')
    expect(await form.field('Nominal magnification').inputValue()).toBe('100')
    expect(
      await page.locator('.v-select', { has: page.getByLabel('Immersion') }).textContent(),
    ).toContain('Oil')
    expect(consoleErrors).toEqual([])
  })
})

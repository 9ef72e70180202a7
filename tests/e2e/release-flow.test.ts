/**
 * In a real browser against the real server with the demo data, the release of one dataset from
 * end to end: the depositor submits, the steward requests changes, the depositor reads the
 * steward's words in the curation thread, fixes and resubmits, the steward approves with an
 * embargo ending tomorrow (UTC), the owner makes a reviewer link that a signed-out browser opens
 * and downloads through while the public page shows no files, and once the server's clock has
 * passed the embargo's end a signed-out browser downloads the file from the public page.
 */
import { createHash } from 'node:crypto'
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import type { RunningStipple } from '@server/start'
import { launchBrowser } from './browser'
import { demoDraft, signInAs, startE2eSession, type E2eSession } from './e2e-session'
import { DatasetPage } from './pages/dataset.page'
import { FilesPage } from './pages/files.page'
import { datasetState, downloadSha256, switchAccount } from './pages/release.page'

const STEWARD = { email: 'noor.halvorsen@quillon.example', password: 'demo-steward-pass' }
const DEPOSITOR = { email: 'kasimir.feld@harrowgate.example', password: 'demo-depositor-pass' }
const OWNER = { email: 'mireille.stroud@harrowgate.example', password: 'demo-owner-pass' }

const TABLE_NAME = 'gain-check.csv'
const TABLE = [
  'frame,x [nm],y [nm],photons',
  '1,1200.5,3400.25,1500',
  '2,1210.0,3410.0,1620',
  '3,1220.0,3420.0,1700',
  '4,1230.0,3430.0,1810',
].join('\n')
const TABLE_SHA256 = createHash('sha256').update(TABLE, 'utf8').digest('hex')
const STEWARD_REQUEST = 'Please say in the description which EM gain this calibration run used.'
const FIXED_DESCRIPTION = 'Calibration run before the next imaging series, at EM gain 150.'

let session: E2eSession
let stipple: RunningStipple
let page: Page
let consoleErrors: string[]
const others: BrowserContext[] = []

beforeAll(async () => {
  session = await startE2eSession()
  ;({ stipple, page, consoleErrors } = session)
})
afterAll(async () => {
  vi.useRealTimers()
  for (const c of others) await c.close()
  await session?.close()
})

/** A fresh chromium profile: no cookies, nobody signed in. */
async function signedOutBrowser(): Promise<Page> {
  const context = await launchBrowser()
  others.push(context)
  return context.pages()[0] ?? context.newPage()
}

const dayAfter = (ms: number) => new Date(ms + 86_400_000).toISOString().slice(0, 10)

describe('releasing a dataset in the browser', () => {
  it('submit → changes → resubmit → approve with embargo → reviewer link → embargo end → public download', async () => {
    const dataset = new DatasetPage(page)

    // 1. The depositor completes the demo draft: the metadata through the API (copied from the
    // project's described dataset; the form is not the point here), a validated table in the UI.
    await signInAs(session, DEPOSITOR)
    const draft = await demoDraft(page)
    const accession = draft.accession
    const copied = await page.evaluate(async (target) => {
      const list = await fetch('/api/datasets?q=Nup96').then((r) => r.json())
      const described = list.items.find(
        (d: { accession: string; state: string }) =>
          d.accession !== target && d.state === 'approved',
      )
      const { metadata } = await fetch(`/api/datasets/${described.accession}/metadata`).then((r) =>
        r.json(),
      )
      const put = await fetch(`/api/datasets/${target}/metadata`, {
        method: 'PUT',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify(metadata),
      })
      return put.status
    }, accession)
    expect(copied).toBe(200)

    await dataset.open(stipple.url, accession)
    const files = new FilesPage(page)
    await files.open()
    await files.upload(TABLE_NAME, TABLE)
    await expect.poll(() => files.status(TABLE_NAME), { timeout: 30_000 }).toBe('ready')

    const submit = async () => {
      await dataset.action('Submit for curation')
      await page.getByRole('dialog').getByRole('button', { name: 'Submit' }).click()
      await expect.poll(async () => (await datasetState(page, accession)).state).toBe('submitted')
    }
    await submit()

    // 2. The steward sends it back with a comment.
    await switchAccount(page, stipple.url, STEWARD)
    await dataset.open(stipple.url, accession)
    const request = await dataset.action('Request changes')
    await request.getByLabel('What must change').fill(STEWARD_REQUEST)
    await request.getByRole('button', { name: 'Request changes' }).click()
    await expect
      .poll(async () => (await datasetState(page, accession)).state)
      .toBe('changes_requested')

    // The depositor reads the steward's words on the dataset page, fixes and resubmits.
    await switchAccount(page, stipple.url, DEPOSITOR)
    await dataset.open(stipple.url, accession)
    const thread = page.locator('section#curation')
    await expect.poll(() => thread.textContent(), { timeout: 10_000 }).toContain(STEWARD_REQUEST)
    expect(await thread.textContent()).toContain('Noor Halvorsen')
    await page
      .getByRole('toolbar', { name: 'Dataset actions' })
      .getByRole('link', { name: 'Edit', exact: true })
      .click()
    await page.waitForURL(/\/edit$/)
    await page.getByRole('textbox', { name: 'Description', exact: true }).fill(FIXED_DESCRIPTION)
    await page.getByRole('button', { name: 'Save changes' }).click()
    await page.waitForURL(new RegExp(`/datasets/${accession}$`))
    await submit()

    // 3. The steward ticks the checklist and approves with an embargo ending tomorrow (UTC).
    const embargoEnd = dayAfter(Date.now())
    await switchAccount(page, stipple.url, STEWARD)
    await dataset.open(stipple.url, accession)
    const approve = await dataset.action('Approve')
    const boxes = approve.getByRole('checkbox')
    await expect.poll(() => boxes.count(), { timeout: 10_000 }).toBeGreaterThan(0)
    for (const box of await boxes.all()) await box.check()
    await approve.getByLabel('Embargo until (optional)').fill(embargoEnd)
    await approve.getByRole('button', { name: 'Approve' }).click()
    await expect
      .poll(async () => (await datasetState(page, accession)).state, { timeout: 10_000 })
      .toBe('approved')
    expect((await datasetState(page, accession)).embargoUntil).toBe(embargoEnd)

    // 4. The owner makes a reviewer link in the access tab.
    await switchAccount(page, stipple.url, OWNER)
    await dataset.open(stipple.url, accession)
    const { id: datasetId } = await datasetState(page, accession)
    const fileId = await page.evaluate(
      (id) =>
        fetch(`/api/datasets/${id}/files`)
          .then((r) => r.json())
          .then((f: { items: { id: number }[] }) => f.items[0]!.id),
      datasetId,
    )
    await dataset.tab('Access and sharing')
    await page.getByRole('button', { name: 'New reviewer link' }).click()
    await page.getByRole('dialog').getByRole('button', { name: 'Create link' }).click()
    const shown = page.getByText(/\/r\/[\w-]+/)
    await shown.waitFor()
    const reviewerUrl = (await shown.textContent())!.trim()
    expect(reviewerUrl.startsWith(`${stipple.url}/r/`)).toBe(true)

    // A signed-out browser with the link sees the dataset and downloads the table.
    const reviewer = await signedOutBrowser()
    await reviewer.goto(reviewerUrl)
    await reviewer.waitForURL(new RegExp(`/datasets/${accession}`))
    await reviewer.getByTestId('accession').waitFor()
    await reviewer.getByRole('tab', { name: 'Files' }).click()
    await reviewer.getByRole('row', { name: new RegExp(TABLE_NAME) }).waitFor()
    // The client's abilities include the link (GET /api/me lists the reviewed datasets), so the
    // Files tab offers the download the banner promises, under embargo too.
    const reviewerSha = await downloadSha256(reviewer, () =>
      reviewer.getByLabel(`Download ${TABLE_NAME}`).click(),
    )
    expect(reviewerSha).toBe(TABLE_SHA256)

    // A signed-out browser without the link: metadata only, no files, the content refused.
    const stranger = await signedOutBrowser()
    const landing = await stranger.goto(`${stipple.url}/d/${accession}`)
    expect(landing?.status()).toBe(200)
    await stranger
      .getByRole('heading', { name: 'Test acquisition with new EMCCD gain settings' })
      .waitFor()
    expect(await stranger.locator('a[download]').count()).toBe(0)
    const refused = await stranger.request.get(
      `${stipple.url}/api/datasets/${datasetId}/files/${fileId}/content`,
    )
    expect([403, 404]).toContain(refused.status())

    // 5. The server's clock passes the embargo's end (Date only, so timers keep running).
    vi.useFakeTimers({ toFake: ['Date'] })
    vi.setSystemTime(new Date(`${embargoEnd}T00:01:00Z`))
    const later = await signedOutBrowser()
    await later.goto(`${stipple.url}/d/${accession}`)
    const publicSha = await downloadSha256(later, () =>
      later.locator('a[download]', { hasText: TABLE_NAME }).click(),
    )
    expect(publicSha).toBe(TABLE_SHA256)
    vi.useRealTimers()

    expect(consoleErrors).toEqual([])
  })
})

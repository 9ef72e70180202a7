/**
 * Two people on one dataset in two browsers, against the real server with the demo data: the
 * external collaborator draws a rectangle on the shared 3D table's preview, labels it and starts
 * a thread on it and measures it (count, then DBSCAN clusters outlined on the preview); the owner,
 * with the dataset page open all along, sees the region and the comment appear without reloading.
 */
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { launchBrowser } from './browser'
import { startE2eSession, type E2eSession } from './e2e-session'
import { SignInPage } from './pages/sign-in.page'

const OWNER = { email: 'lena.ortolan@vesperridge.example', password: 'demo-owner-pass' }
const COLLABORATOR = {
  email: 'priya.vantongeren@elsewhere.example',
  password: 'demo-collaborator-pass',
}
const TITLE = 'Bassoon 3D astigmatic STORM, cortical slices'

let session: E2eSession
let second: BrowserContext
let owner: Page
let collaborator: Page

async function signIn(page: Page, account: { email: string; password: string }) {
  await page.goto(session.stipple.url)
  await new SignInPage(page).signIn(account.email, account.password)
  await page.waitForURL(`${session.stipple.url}/`)
}

beforeAll(async () => {
  session = await startE2eSession({ demoTables: true })
  owner = session.page
  second = await launchBrowser()
  collaborator = await second.newPage()
  collaborator.on('pageerror', (e) => session.consoleErrors.push(e.message))
  await signIn(owner, OWNER)
  await signIn(collaborator, COLLABORATOR)
  // The demo tables are being read meanwhile, keeping both cores busy.
}, 240_000)
afterAll(async () => {
  await second?.close()
  await session?.close()
})

/** The shared table, once it has been read (its preview exists). */
async function readyTable(page: Page): Promise<{ accession: string; fileId: number }> {
  const end = Date.now() + 300_000
  for (;;) {
    const found = await page.evaluate(
      (title) =>
        fetch(`/api/datasets?q=${encodeURIComponent('Bassoon')}`)
          .then((r) => r.json())
          .then((b: { items: { accession: string; title: string }[] }) =>
            b.items.find((d) => d.title === title),
          ),
      TITLE,
    )
    const files = await page.evaluate(
      (accession) => fetch(`/api/datasets/${accession}/files`).then((r) => r.json()),
      found!.accession,
    )
    const file = (files.items as { id: number; status: string }[])[0]
    if (file?.status === 'ready') return { accession: found!.accession, fileId: file.id }
    if (Date.now() > end) throw new Error('the demo table was not read in time')
    await new Promise((r) => setTimeout(r, 1000))
  }
}

describe('regions and threads between two people', () => {
  it('shows the owner a region and comment the collaborator adds, without a reload', async () => {
    const { accession, fileId } = await readyTable(collaborator)
    await owner.goto(`${session.stipple.url}/datasets/${accession}`)
    const discussion = owner.getByTestId('dataset-discussion')
    await discussion.getByText('Bright cluster, upper left').first().waitFor()

    await collaborator.goto(`${session.stipple.url}/datasets/${accession}/files/${fileId}`)
    const map = collaborator.locator('.map')
    await map.waitFor()
    await collaborator.getByTestId('region-list').waitFor()
    await collaborator.getByTestId('tool-rectangle').click()
    const box = (await map.boundingBox())!
    const cx = box.x + box.width / 2
    const cy = box.y + box.height / 2
    await collaborator.mouse.click(cx - 60, cy - 40)
    await collaborator.mouse.click(cx + 60, cy + 40)
    const label = collaborator.getByTestId('region-label').locator('input')
    await label.fill('Synapse seen from the side')
    await collaborator.getByTestId('region-save').click()
    const detail = collaborator.getByTestId('region-detail')
    await detail.getByText('Synapse seen from the side').waitFor()

    // The region is stored in sample nm inside the table's field, not in screen pixels.
    const stored = await collaborator.evaluate(
      ([a, f]) => fetch(`/api/datasets/${a}/files/${f}/regions`).then((r) => r.json()),
      [accession, fileId] as const,
    )
    const region = (
      stored.items as { label: string; geometry: { coordinates: number[][][] } }[]
    ).find((r) => r.label === 'Synapse seen from the side')!
    const xs = region.geometry.coordinates[0]!.map((p) => p[0]!)
    expect(Math.max(...xs) - Math.min(...xs)).toBeGreaterThan(0)

    await owner.getByText('Synapse seen from the side').waitFor({ timeout: 5000 })

    await detail
      .getByTestId('comment-input')
      .locator('textarea')
      .first()
      .fill('Is this **one** synapse? <script>window.pwned = 1</script>')
    await detail.getByTestId('comment-post').click()
    await detail.getByText('synapse?').first().waitFor()

    const comment = owner.getByText('Is this one synapse?', { exact: false })
    await comment.first().waitFor({ timeout: 5000 })
    expect(await owner.locator('strong', { hasText: 'one' }).count()).toBeGreaterThan(0)
    expect(await owner.evaluate(() => (window as { pwned?: number }).pwned)).toBeUndefined()

    // Measuring: the count the panel shows is the server's count for the region, and DBSCAN's
    // clusters are listed and drawn back as outlines on the map.
    const regionId = (stored.items as { id: number; label: string }[]).find(
      (r) => r.label === 'Synapse seen from the side',
    )!.id
    await detail.getByTestId('measure').click()
    const summary = await collaborator.evaluate(
      (id) => fetch(`/api/regions/${id}/measurements?kind=summary`).then((r) => r.json()),
      regionId,
    )
    expect(summary.count).toBeGreaterThan(0)
    await detail
      .getByText(`${summary.count.toLocaleString('en-US')} localizations in`)
      .waitFor({ timeout: 60_000 })
    await detail.getByRole('button', { name: 'Clusters' }).click()
    await detail.getByTestId('measure').click()
    const clusters = detail.getByTestId('cluster-summary')
    await clusters.waitFor({ timeout: 120_000 })
    const dbscan = await collaborator.evaluate(
      (id) =>
        fetch(`/api/regions/${id}/measurements?kind=dbscan&eps=20&minPts=5`).then((r) => r.json()),
      regionId,
    )
    expect(dbscan.cached).toBe(true) // the panel asked the same question first
    expect(await clusters.textContent()).toContain(
      `${dbscan.clusters.length.toLocaleString('en-US')} clusters, outlined on the preview`,
    )

    await owner.screenshot({ path: '/tmp/regions-e2e-owner.png', fullPage: true })
    await collaborator.screenshot({ path: '/tmp/regions-e2e-collaborator.png', fullPage: true })
    expect(session.consoleErrors).toEqual([])
  }, 360_000)
})

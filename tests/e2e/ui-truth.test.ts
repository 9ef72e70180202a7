/**
 * Issue 16, "the interface tells the truth", in a real browser against the demo server: every demo
 * role walks its main pages (home, dataset list, a dataset with its tabs, the description, the
 * audit log where allowed, the profile), and each page fails on a console error, on text wider
 * than its table cell or dialog, and on a select that shows a schema identifier where words exist.
 * Beside the walk, one check per point: status texts per state, the file count, "not found", the
 * embargo note, the staff home, the vocabulary suggestions, dialogs at two screen sizes.
 */
import { readFileSync } from 'node:fs'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RunningStipple } from '@server/start'
import { metadataJsonSchema } from '@shared/metadata/vocabulary'
import { termLabel } from '@shared/metadata/term-labels'
import { signInAs, startE2eSession, type E2eSession } from './e2e-session'
import { DatasetPage } from './pages/dataset.page'
import { FilesPage } from './pages/files.page'
import { MetadataFormPage } from './pages/metadata-form.page'
import { UiAudit } from './pages/ui-audit.page'

interface Account {
  email: string
  password: string
  name: string
  role: string
}
const accounts: Account[] = JSON.parse(
  readFileSync(new URL('../../demo-data/accounts.json', import.meta.url), 'utf8'),
)
const account = (role: string) => accounts.find((a) => a.role === role)!

/** Enumeration values that are identifiers (no spaces) with words of their own. */
function rawIdentifiers(): Set<string> {
  const found = new Set<string>()
  const walk = (node: unknown) => {
    if (!node || typeof node !== 'object') return
    const n = node as Record<string, unknown>
    if (Array.isArray(n.enum))
      for (const v of n.enum)
        if (typeof v === 'string' && !v.includes(' ') && termLabel(v) !== v) found.add(v)
    Object.values(n).forEach(walk)
  }
  walk(metadataJsonSchema())
  return found
}
const IDENTIFIERS = rawIdentifiers()

const SMALL = { width: 1280, height: 800 }
const LARGE = { width: 1920, height: 1080 }

let session: E2eSession
let stipple: RunningStipple
let page: Page
let audit: UiAudit
let datasetPage: DatasetPage

beforeAll(async () => {
  session = await startE2eSession()
  ;({ stipple, page } = session)
  audit = new UiAudit(page)
  datasetPage = new DatasetPage(page)
  await page.setViewportSize(SMALL)
})
afterAll(() => session?.close())

async function become(role: string | null) {
  // Leave the app first: sessions are rolling, so an answer still on its way to the last page
  // (the audit log's, say) would set the previous person's cookie again after the clearing.
  await page.goto('about:blank')
  await session.browser.clearCookies()
  expect(await session.browser.cookies(), 'cookies left after clearing').toEqual([])
  if (role) await signInAs(session, account(role))
  else await page.goto(stipple.url)
}

/** What the page shows must fit and read as words; `where` names the page in a failure. */
async function expectTidy(where: string) {
  await audit.settled()
  expect(await audit.overflowing(), `${where}: text wider than its box`).toEqual([])
  const raw = (await audit.choiceTexts()).filter((t) => IDENTIFIERS.has(t))
  expect(raw, `${where}: identifiers instead of words`).toEqual([])
}

/** The datasets this browser's person sees, as the list API gives them. */
async function visible(): Promise<
  { accession: string; state: string; embargoUntil: string | null }[]
> {
  const page1 = await page.evaluate(() =>
    fetch('/api/datasets?itemsPerPage=100').then((r) => r.json()),
  )
  return page1.items
}

/** Approved with an embargo that has not ended yet (the demo also has one that ended). */
const underEmbargo = (d: { state: string; embargoUntil: string | null }) =>
  d.state === 'approved' &&
  !!d.embargoUntil &&
  Date.parse(`${d.embargoUntil.slice(0, 10)}T00:00:00Z`) > Date.now()

/** Home, the list, each state's dataset with its tabs, its description, the audit log, the profile. */
async function walk(role: string) {
  await page.goto(stipple.url)
  await expectTidy(`${role} home`)
  await page.goto(`${stipple.url}/datasets`)
  await page.getByTestId('datasets-table').waitFor()
  await expectTidy(`${role} dataset list`)

  const seen = new Set<string>()
  for (const d of await visible()) {
    const kind = underEmbargo(d) ? 'embargoed' : d.state
    if (seen.has(kind)) continue
    seen.add(kind)
    await datasetPage.open(stipple.url, d.accession)
    const step = await datasetPage.nextStep()
    if (d.state !== 'draft' && d.state !== 'changes_requested') {
      expect(step, `${role} ${d.accession}`).not.toMatch(/ready to submit/i)
    }
    await expectTidy(`${role} ${d.accession} overview`)
    await datasetPage.tab('Files')
    await expectTidy(`${role} ${d.accession} files`)
    // The access tab and the description page look the same in every state: once per role.
    if (seen.size > 1) continue
    await datasetPage.tab('Access and sharing')
    await expectTidy(`${role} ${d.accession} access`)
    await page.goto(`${stipple.url}/datasets/${d.accession}/describe`)
    await page.locator('.metadata-form').waitFor()
    await expectTidy(`${role} ${d.accession} description`)
  }

  if (await page.getByRole('link', { name: 'Audit log' }).count()) {
    await page.goto(`${stipple.url}/admin/audit`)
    await expectTidy(`${role} audit log`)
  }
  if (role !== 'public') {
    await page.goto(`${stipple.url}/profile`)
    await expectTidy(`${role} profile`)
  }
  expect(session.consoleErrors, `${role}: console errors`).toEqual([])
}

/** Opens a dialog at both screen sizes and checks that its body fits. */
async function expectDialogFits(where: string, open: () => Promise<unknown>) {
  for (const size of [SMALL, LARGE]) {
    await page.setViewportSize(size)
    await open()
    await datasetPage.dialog().waitFor()
    await page.waitForTimeout(300) // the dialog's opening transition
    await expectTidy(`${where} at ${size.width}×${size.height}`)
    await datasetPage.closeDialog()
  }
  await page.setViewportSize(SMALL)
}

const WALK = 'walks its pages: no console error, nothing overflowing, words instead of identifiers'

/** A staff home: links to the role's work, no advice meant for people without a project (6). */
async function expectStaffHome(role: string, link: string) {
  await page.goto(stipple.url)
  const home = page.getByTestId('staff-home')
  await home.waitFor()
  expect(await page.getByText(/Ask a project owner/).count(), role).toBe(0)
  expect(await home.getByRole('link', { name: new RegExp(link) }).count(), role).toBe(1)
}

/** Set by the steward, read by the depositor: the dataset sent back for changes. */
let sentBack = ''

describe('signed out', () => {
  beforeAll(() => become(null))
  it(WALK, () => walk('public'))

  it('approved datasets say when they are released or since when they are public (1)', async () => {
    const list = await visible()
    const embargoed = list.find(underEmbargo)!
    await datasetPage.open(stipple.url, embargoed.accession)
    expect(await datasetPage.nextStep()).toMatch(/^Under embargo until /)
    const open = list.find((d) => d.state === 'approved' && !d.embargoUntil)!
    await datasetPage.open(stipple.url, open.accession)
    expect(await datasetPage.nextStep()).toMatch(/^Public since /)
  })

  it('the embargoed Files tab says until when and whom to ask (5)', async () => {
    const embargoed = (await visible()).find(underEmbargo)!
    await datasetPage.open(stipple.url, embargoed.accession)
    await datasetPage.tab('Files')
    const note = page.getByTestId('files-access-note')
    expect(await note.textContent()).toMatch(/Files under embargo until .*ask the depositor/s)
  })
})

describe('site admin', () => {
  beforeAll(() => become('admin'))
  it(WALK, () => walk('admin'))
  it('has a home for the role that leads to the audit log (6)', async () => {
    await expectStaffHome('admin', 'Audit log')
    await page
      .getByTestId('staff-home')
      .getByRole('link', { name: /Audit log/ })
      .click()
    await page.waitForURL(`${stipple.url}/admin/audit`)
  })
})

describe('data steward', () => {
  beforeAll(() => become('steward'))
  it(WALK, () => walk('steward'))
  it('has a home for the role with the datasets awaiting review (6)', () =>
    expectStaffHome('steward', 'Awaiting your check'))

  it('sends a dataset back with what must change (1); the review dialogs fit (10)', async () => {
    const submitted = (await visible()).find((d) => d.state === 'submitted')!
    await datasetPage.open(stipple.url, submitted.accession)
    expect(await datasetPage.nextStep()).toContain('Waiting for a data steward')
    await expectDialogFits('approve dialog', () => datasetPage.action('Approve'))
    const dialog = await datasetPage.action('Request changes')
    await dialog.getByLabel('What must change').fill('Name the drift correction method.')
    await dialog.getByRole('button', { name: 'Request changes' }).click()
    await dialog.waitFor({ state: 'hidden' })
    expect(await datasetPage.nextStep()).toContain('“Name the drift correction method.”')
    sentBack = submitted.accession
  })

  it('the embargo and withdraw dialogs fit (10)', async () => {
    const embargoed = (await visible()).find(underEmbargo)!
    await datasetPage.open(stipple.url, embargoed.accession)
    await expectDialogFits('embargo dialog', () => datasetPage.action('Set embargo'))
    await expectDialogFits('withdraw dialog', () => datasetPage.action('Withdraw'))
    expect(session.consoleErrors).toEqual([])
  })
})

describe('journal editor', () => {
  beforeAll(() => become('editor'))
  it(WALK, () => walk('editor'))
  it('has a home for the role with the manuscripts of the journal (6)', () =>
    expectStaffHome('editor', 'Your manuscripts'))
})

describe('project owner', () => {
  beforeAll(() => become('owner'))
  it(WALK, () => walk('owner'))

  it('the members card and the add-member and token dialogs fit (10)', async () => {
    const projects = await page.evaluate(() => fetch('/api/projects').then((r) => r.json()))
    await page.goto(`${stipple.url}/projects/${projects.items[0].id}`)
    await page.getByRole('table', { name: 'Members' }).waitFor()
    for (const size of [SMALL, LARGE]) {
      await page.setViewportSize(size)
      await expectTidy(`project page at ${size.width}×${size.height}`)
    }
    // The page's button (the dialog's own submit button has the same name).
    await expectDialogFits('add member dialog', () =>
      page.locator('#app').getByRole('button', { name: 'Add member' }).click(),
    )
    await page.goto(`${stipple.url}/profile`)
    await expectDialogFits('create token dialog', () =>
      page
        .getByRole('region', { name: 'Personal access tokens' })
        .getByRole('button', { name: 'Create token' })
        .click(),
    )
    expect(session.consoleErrors).toEqual([])
  })
})

describe('depositor', () => {
  beforeAll(() => become('depositor'))
  it(WALK, () => walk('depositor'))

  it('reads what the steward asked to change (1)', async () => {
    expect(sentBack).not.toBe('')
    await datasetPage.open(stipple.url, sentBack)
    const step = await datasetPage.nextStep()
    expect(step).toContain('Changes requested')
    expect(step).toContain('“Name the drift correction method.”')
    expect(step).not.toMatch(/ready to submit/i)
  })

  it('a missing dataset is "not found" with a way to the list, and no "Try again" (3)', async () => {
    const before = session.consoleErrors.length
    await datasetPage.open(stipple.url, 'STPL-999999')
    const missing = page.getByTestId('dataset-not-found')
    expect(await missing.textContent()).toContain('Dataset not found')
    expect(await page.getByRole('button', { name: 'Try again' }).count()).toBe(0)
    await missing.getByRole('link', { name: 'Browse datasets' }).click()
    await page.waitForURL(`${stipple.url}/datasets`)
    // The browser itself reports the 404 answer; nothing else may have gone wrong.
    const added = session.consoleErrors.slice(before)
    expect(added.filter((e) => !e.includes('404') || !e.includes('STPL-999999'))).toEqual([])
    session.consoleErrors.splice(before)
  })

  it('files uploaded to a draft are counted on its overview and its description (2), dialogs fit (10)', async () => {
    const draft = (await visible()).find((d) => d.state === 'draft')!
    await datasetPage.open(stipple.url, draft.accession)
    const files = new FilesPage(page)
    await files.open()
    await files.upload('locs.csv', 'frame,x [nm],y [nm],photons\n1,100,200,900\n2,110,210,950\n')
    await expect.poll(() => files.status('locs.csv'), { timeout: 30_000 }).toBe('ready')
    await expectTidy('files table of a draft')
    await expectDialogFits('file details dialog', () => files.openReport('locs.csv'))
    await datasetPage.tab('Overview')
    await expect
      .poll(() => page.getByTestId('files-count').textContent())
      .toContain('1 file deposited, ready')
    await expectDialogFits('methods text dialog', () =>
      page.getByRole('button', { name: 'Methods text' }).click(),
    )
    await expectDialogFits('submit dialog', () => datasetPage.action('Submit for curation'))
    await datasetPage.tab('Access and sharing')
    await expectDialogFits('share dialog', () =>
      page
        .getByRole('region', { name: 'Shared with' })
        .getByRole('button', { name: 'Share', exact: true })
        .click(),
    )

    await page.goto(`${stipple.url}/datasets/${draft.accession}/describe`)
    const form = new MetadataFormPage(page)
    await form.openSection('Files')
    expect(await page.getByTestId('deposited-files').textContent()).toContain('locs.csv')
    expect(session.consoleErrors).toEqual([])
  })

  it('organism and fluorophore suggest from the shipped vocabulary, free text still taken (9)', async () => {
    const draft = (await visible()).find((d) => d.state === 'draft')!
    await page.goto(`${stipple.url}/datasets/${draft.accession}/describe`)
    const form = new MetadataFormPage(page)
    await form.openSection('Biosample')
    const organism = form.field('Organism')
    await organism.fill('Mus')
    await page.getByRole('option', { name: 'Mus musculus' }).click()
    await expect.poll(() => form.field('NCBI Taxonomy id').inputValue()).toBe('10090')

    await form.openSection('Labelling')
    if (!(await page.getByLabel('Label (fluorophore)').count())) await form.addEntry('labelling')
    const label = page.getByLabel('Label (fluorophore)').first()
    await label.fill('mEos')
    await page.getByRole('option', { name: 'mEos3.2' }).waitFor()
    await label.fill('a dye of our own')
    await page.keyboard.press('Tab')
    expect(await label.inputValue()).toBe('a dye of our own')

    for (const section of ['Instrument', 'Acquisition', 'Localization processing']) {
      await form.openSection(section)
    }
    const raw = (await audit.optionTexts()).filter((t) => IDENTIFIERS.has(t))
    expect(raw, 'select options showing identifiers').toEqual([])
    expect(session.consoleErrors).toEqual([])
  })
})

describe('external collaborator', () => {
  beforeAll(() => become('collaborator'))
  it(WALK, () => walk('collaborator'))
})

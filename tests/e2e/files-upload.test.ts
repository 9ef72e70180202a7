/**
 * In a real browser against the real server with the demo data: a depositor uploads a table whose
 * header leaves no doubt and finds its bad row by line number in the report, then uploads a table
 * with bare column names, maps its columns in the dialog and sees it read.
 */
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RunningStipple } from '@server/start'
import { demoDraft, signInAs, startE2eSession, type E2eSession } from './e2e-session'
import { FilesPage } from './pages/files.page'

let session: E2eSession
let stipple: RunningStipple
let page: Page
let consoleErrors: string[]

beforeAll(async () => {
  session = await startE2eSession()
  ;({ stipple, page, consoleErrors } = session)
})
afterAll(() => session?.close())

// Line 4 holds a word where the frame number belongs: the one row the ingest must refuse.
const CLEAR = [
  'frame,x [nm],y [nm],photons',
  '1,1200.5,3400.25,1500',
  '2,1210.0,3410.0,1620',
  'three,1220.0,3420.0,1700',
  '4,1230.0,3430.0,1810',
  '5,1240.0,3440.0,1905',
].join('\n')
const AMBIGUOUS = ['a,b,c', '1,500,800', '2,510,810', '3,520,820', '4,530,830'].join('\n')

describe('a depositor uploading tables in the browser', () => {
  it('uploads, reads the report, maps an ambiguous table and sees both ready', async () => {
    await signInAs(session)
    const draft = await demoDraft(page)
    await page.goto(`${stipple.url}/datasets/${draft.accession}`)
    const files = new FilesPage(page)
    await files.open()
    await expect.poll(() => page.getByTestId('files-empty').count()).toBe(1)

    await files.upload('clear-header.csv', CLEAR)
    await expect.poll(() => files.status('clear-header.csv'), { timeout: 20_000 }).toBe('ready')
    const report = await files.openReport('clear-header.csv')
    await expect.poll(() => report.textContent()).toContain('Line 4')
    expect(await report.getByTestId('row-counts').textContent()).toMatch(/Rejected\s*1/)
    await files.closeDialog()

    await files.upload('ambiguous.csv', AMBIGUOUS)
    await expect
      .poll(() => files.status('ambiguous.csv'), { timeout: 20_000 })
      .toBe('needs_mapping')
    await files.openMapping('ambiguous.csv')
    await files.mapColumn('a', 'frame')
    await files.mapColumn('b', 'x')
    await files.mapColumn('c', 'y')
    await files.saveMapping()
    await expect.poll(() => files.status('ambiguous.csv'), { timeout: 20_000 }).toBe('ready')
    expect(consoleErrors).toEqual([])
  })
})

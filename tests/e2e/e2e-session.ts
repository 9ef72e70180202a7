import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { BrowserContext, Page } from 'playwright-core'
import { loadConfig } from '@server/config'
import { CLIENT_DIR } from '@server/paths'
import { startStipple, type RunningStipple } from '@server/start'
import { launchBrowser } from './browser'
import { SignInPage } from './pages/sign-in.page'

export interface E2eSession {
  stipple: RunningStipple
  browser: BrowserContext
  page: Page
  /** Console errors and uncaught page errors seen so far; a test ends by expecting none. */
  consoleErrors: string[]
  close(): Promise<void>
}

/**
 * The real server with the demo data and the built client, and a headless chromium page on it.
 * The simulated demo tables (and the jobs that read them) only when a test asks for them: they
 * keep both cores busy for a minute or two.
 */
export async function startE2eSession(options: { demoTables?: boolean } = {}): Promise<E2eSession> {
  const dataDir = mkdtempSync(join(tmpdir(), 'stipple-e2e-'))
  const config = loadConfig({
    NODE_ENV: 'test',
    DATA_DIR: dataDir,
    PORT: '0',
    HOST: '127.0.0.1',
    LOG_LEVEL: 'error',
    DEMO_TABLES: options.demoTables ? 'true' : 'false',
  })
  const stipple = await startStipple(config, { clientDir: CLIENT_DIR })
  const browser = await launchBrowser()
  const page = await browser.newPage()
  const consoleErrors: string[] = []
  page.on('console', (m) => {
    // With the resource's address: "Failed to load resource: … 404" alone does not say which.
    if (m.type() === 'error') consoleErrors.push(`${m.text()} [${m.location().url}]`)
  })
  page.on('pageerror', (e) => consoleErrors.push(e.message))
  return {
    stipple,
    browser,
    page,
    consoleErrors,
    async close() {
      await browser.close()
      await stipple.stop()
      rmSync(dataDir, { recursive: true, force: true })
    },
  }
}

/** The demo depositor (demo-data/accounts.json) the browser tests act as. */
export const DEPOSITOR = {
  email: 'kasimir.feld@harrowgate.example',
  password: 'demo-depositor-pass',
}

/** Signs the page in through the stand-in provider and waits for the home page. */
export async function signInAs(session: E2eSession, account = DEPOSITOR): Promise<void> {
  await session.page.goto(session.stipple.url)
  await new SignInPage(session.page).signIn(account.email, account.password)
  await session.page.waitForURL(`${session.stipple.url}/`)
}

/** The demo depositor's draft the tests work on, found through the API as the page sees it. */
export async function demoDraft(page: Page): Promise<{ accession: string; state: string }> {
  const found = await page.evaluate(() =>
    fetch('/api/datasets?q=new%20EMCCD%20gain%20settings').then((r) => r.json()),
  )
  return found.items.find(
    (d: { title: string }) => d.title === 'Test acquisition with new EMCCD gain settings',
  )
}

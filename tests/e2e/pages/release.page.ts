import { createHash } from 'node:crypto'
import { readFile } from 'node:fs/promises'
import type { Page } from 'playwright-core'
import { SignInPage } from './sign-in.page'

/** Switches the page to another demo account: signs out of the app and of the stand-in provider. */
export async function switchAccount(
  page: Page,
  baseUrl: string,
  account: { email: string; password: string },
) {
  await page.getByRole('button', { name: 'Sign out' }).click()
  await page.waitForURL(`${baseUrl}/`)
  // The stand-in provider would otherwise remember who signed in last.
  await page.context().clearCookies()
  await page.getByRole('button', { name: 'Sign in' }).first().waitFor()
  await new SignInPage(page).signIn(account.email, account.password)
  await page.waitForURL(`${baseUrl}/`)
}

/** The dataset as the signed-in page sees it through the API. */
export async function datasetState(page: Page, accession: string) {
  return page.evaluate(
    (a) =>
      fetch(`/api/datasets/${a}`).then(
        (r) => r.json() as Promise<{ id: number; state: string; embargoUntil: string | null }>,
      ),
    accession,
  )
}

/** Clicks a link or button that starts a download and returns the downloaded bytes' SHA-256. */
export async function downloadSha256(page: Page, start: () => Promise<void>): Promise<string> {
  const [download] = await Promise.all([page.waitForEvent('download'), start()])
  const path = await download.path()
  return createHash('sha256')
    .update(await readFile(path))
    .digest('hex')
}

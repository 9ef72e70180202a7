/**
 * In a real browser, on a network slowed down by chromium's own throttling (DevTools protocol
 * Network.emulateNetworkConditions): a depositor pauses an upload and resumes it, reloads the page
 * in the middle of it, chooses the same file again and sees it continue where it stopped, with the
 * stored checksum equal to the file's; drops several files at once; and cancels an upload, of
 * which nothing is kept.
 */
import { createHash, randomBytes } from 'node:crypto'
import type { CDPSession, Locator, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RunningStipple } from '@server/start'
import { demoDraft, signInAs, startE2eSession, type E2eSession } from './e2e-session'
import { FilesPage } from './pages/files.page'

let session: E2eSession
let stipple: RunningStipple
let page: Page
let cdp: CDPSession
let consoleErrors: string[]
let accession: string

const MIB = 1024 * 1024
/** Upload speed while throttled: a 24 MiB file takes about six seconds. */
const THROTTLED_BYTES_PER_S = 4 * MIB

beforeAll(async () => {
  session = await startE2eSession()
  ;({ stipple, page, consoleErrors } = session)
  await signInAs(session)
  accession = (await demoDraft(page)).accession
  cdp = await page.context().newCDPSession(page)
})
afterAll(() => session?.close())

async function throttle(on: boolean) {
  await cdp.send('Network.enable')
  await cdp.send('Network.emulateNetworkConditions', {
    offline: false,
    latency: 0,
    downloadThroughput: -1,
    uploadThroughput: on ? THROTTLED_BYTES_PER_S : -1,
  })
}

async function openFiles() {
  await page.goto(`${stipple.url}/datasets/${accession}`)
  const files = new FilesPage(page)
  await files.open()
  await page.getByTestId('files-table').or(page.getByTestId('files-empty')).waitFor()
  return files
}

const uploadRow = (name: string): Locator => page.locator(`li[data-upload="${name}"]`)
/** The percentage the row's progress bar announces. */
async function percent(name: string): Promise<number> {
  const text = await uploadRow(name).getByRole('progressbar').getAttribute('aria-valuetext')
  return Number(/(\d+)/.exec(text ?? '')?.[1] ?? -1)
}

async function storedFiles(): Promise<{ name: string; sha256: string; size: number }[]> {
  const body = await page.evaluate(
    (a) => fetch(`/api/datasets/${a}/files`).then((r) => r.json()),
    accession,
  )
  return body.items
}

describe('upload controls in the browser', () => {
  it('pauses and resumes, survives a reload, and stores exactly the file', async () => {
    const bytes = randomBytes(24 * MIB)
    const name = 'slow-stack.bin'
    await throttle(true)
    const files = await openFiles()
    await files.uploadBytes(name, bytes)
    await expect.poll(() => percent(name), { timeout: 20_000 }).toBeGreaterThan(5)

    await uploadRow(name).getByRole('button', { name: 'Pause' }).click()
    await expect.poll(() => uploadRow(name).getAttribute('data-state')).toBe('paused')
    const pausedAt = await percent(name)
    await page.waitForTimeout(1500)
    expect(await percent(name)).toBe(pausedAt)

    await uploadRow(name).getByRole('button', { name: 'Resume' }).click()
    await expect.poll(() => percent(name), { timeout: 20_000 }).toBeGreaterThan(pausedAt + 10)
    // Mid-way through the rest: the tab reloads, the File object is gone.
    await page.reload()
    await new FilesPage(page).open()
    const waiting = page.getByTestId('unfinished-uploads')
    await expect.poll(() => waiting.textContent(), { timeout: 10_000 }).toContain(name)

    await throttle(false)
    await files.uploadBytes(name, bytes)
    await expect
      .poll(() => uploadRow(name).textContent(), { timeout: 10_000 })
      .toMatch(/Continued from \d+ %/)
    await expect
      .poll(() => storedFiles().then((list) => list.find((f) => f.name === name)?.sha256), {
        timeout: 30_000,
      })
      .toBe(createHash('sha256').update(bytes).digest('hex'))
    await expect.poll(() => waiting.count()).toBe(0)
    expect(consoleErrors).toEqual([])
  })

  it('takes several files dropped at once and stores them all', async () => {
    await throttle(false)
    await openFiles()
    const names = ['drop-a.bin', 'drop-b.bin', 'drop-c.bin']
    const sizes = [3 * MIB, 1 * MIB + 7, 2 * MIB]
    // A drop as the browser delivers it: one DataTransfer holding all the files.
    const zone = page.getByLabel('Files of this dataset; drop files here to upload them')
    const dataTransfer = await page.evaluateHandle(
      ({ names, sizes }) => {
        const dt = new DataTransfer()
        names.forEach((name, i) => {
          const bytes = new Uint8Array(sizes[i]!)
          for (let j = 0; j < bytes.length; j++) bytes[j] = (j * 31 + i) & 0xff
          dt.items.add(new File([bytes], name))
        })
        return dt
      },
      { names, sizes },
    )
    await zone.dispatchEvent('dragenter', { dataTransfer })
    await zone.dispatchEvent('dragover', { dataTransfer })
    await zone.dispatchEvent('drop', { dataTransfer })
    await expect
      .poll(
        async () => {
          const stored = await storedFiles()
          return names.map((n) => stored.find((f) => f.name === n)?.size ?? null)
        },
        { timeout: 30_000 },
      )
      .toEqual(sizes)
    expect(consoleErrors).toEqual([])
  })

  it('cancels an upload: nothing of it is kept, nothing waits to be resumed', async () => {
    const name = 'cancel-me.bin'
    await throttle(true)
    const files = await openFiles()
    await files.uploadBytes(name, randomBytes(16 * MIB))
    await expect.poll(() => percent(name), { timeout: 20_000 }).toBeGreaterThan(5)
    await uploadRow(name).getByRole('button', { name: 'Cancel' }).click()
    await expect.poll(() => uploadRow(name).getAttribute('data-state')).toBe('cancelled')
    await throttle(false)
    expect((await storedFiles()).some((f) => f.name === name)).toBe(false)
    await page.reload()
    await new FilesPage(page).open()
    await page.getByTestId('files-table').waitFor()
    expect(await page.getByTestId('unfinished-uploads').count()).toBe(0)
    expect(consoleErrors).toEqual([])
  })
})

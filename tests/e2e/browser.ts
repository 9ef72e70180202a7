import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { execFileSync } from 'node:child_process'
import { chromium, type BrowserContext } from 'playwright-core'

/** Debian's chromium (installed by .ci/run), or CHROMIUM_PATH. playwright-core downloads no browser. */
export function chromiumPath(): string {
  if (process.env.CHROMIUM_PATH) return process.env.CHROMIUM_PATH
  try {
    return execFileSync('sh', ['-c', 'command -v chromium || command -v chromium-browser'], {
      encoding: 'utf8',
    }).trim()
  } catch {
    throw new Error(
      'No chromium found: install Debian\'s "chromium" package (.ci/run does) or set CHROMIUM_PATH.',
    )
  }
}

export async function launchBrowser(): Promise<BrowserContext> {
  return chromium.launchPersistentContext(mkdtempSync(join(tmpdir(), 'stipple-chromium-')), {
    executablePath: chromiumPath(),
    headless: true,
    viewport: { width: 1360, height: 900 },
    // The sandbox needs privileges CI containers lack; the other flags keep chromium off the network.
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      '--disable-quic',
    ],
  })
}

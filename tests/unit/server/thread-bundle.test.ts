// @vitest-environment node
/**
 * Thread entries written in TypeScript start from a compiled bundle, made again when a source
 * changes, and every bundled module still finds its neighbours by its own import.meta.url.
 */
import { existsSync, mkdirSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { once } from 'node:events'
import { afterAll, describe, expect, it } from 'vitest'
import { startThread, withoutTsxLoader } from '@server/threads'

const root = fileURLToPath(new URL('../../..', import.meta.url))
// Inside the repository: the bundle leaves packages to node_modules, found from where it lives.
const folder = join(root, 'tmp', `thread-bundle-${process.pid}`)
const cache = join(root, 'node_modules', '.cache', 'stipple-threads')
const started = Date.now()
afterAll(() => {
  rmSync(folder, { recursive: true, force: true })
  for (const file of probeBundles()) rmSync(join(cache, file), { force: true })
})

function writeModules(value: number, padding = '') {
  mkdirSync(folder, { recursive: true })
  writeFileSync(
    join(folder, 'neighbour.ts'),
    `export const value: number = ${value}${padding}\nexport const where = import.meta.url\n`,
  )
  writeFileSync(
    join(folder, 'probe.thread.ts'),
    [
      `import { parentPort } from 'node:worker_threads'`,
      `import { value, where } from './neighbour'`,
      `const sibling = new URL('./neighbour.ts', import.meta.url).href`,
      `parentPort!.postMessage({ value, where, sibling })`,
    ].join('\n'),
  )
}

async function runProbe() {
  const thread = startThread(pathToFileURL(join(folder, 'probe.thread.ts')))
  const [message] = (await once(thread, 'message')) as [
    { value: number; where: string; sibling: string },
  ]
  await thread.terminate()
  return message
}

const probeBundles = () =>
  existsSync(cache) ? readdirSync(cache).filter((f) => f.startsWith('probe.thread-')) : []
/** Bundles of the probe made by this run (none when the thread fell back to tsx). */
const madeNow = () =>
  probeBundles().filter(
    (f) => f.endsWith('.mjs') && statSync(join(cache, f)).mtimeMs >= started - 1000,
  )

describe('thread entries', () => {
  it('run from a bundle whose modules keep their own addresses', async () => {
    writeModules(1)
    const message = await runProbe()
    expect(message.value).toBe(1)
    const neighbour = pathToFileURL(join(folder, 'neighbour.ts')).href
    expect(message.where).toBe(neighbour)
    expect(message.sibling).toBe(neighbour)
    expect(madeNow()).toHaveLength(1)
  })

  it('are bundled again when a source they import changes', async () => {
    writeModules(1)
    expect((await runProbe()).value).toBe(1)
    writeModules(2, ' + 0') // another size as well as another time: a change the check sees
    expect((await runProbe()).value).toBe(2)
  })
})

describe("a thread's Node flags", () => {
  it('are the process flags without tsx’s loader, in each way it is given', () => {
    const argv = [
      '--require',
      '/srv/stipple/node_modules/tsx/dist/preflight.cjs',
      '--import',
      'file:///srv/stipple/node_modules/tsx/dist/loader.mjs',
      '--import=tsx',
      '-r',
      'tsx/cjs',
      '--max-old-space-size=4096',
      '--import',
      './telemetry.mjs',
      '--cpu-prof',
    ]
    expect(withoutTsxLoader(argv)).toEqual([
      ['--max-old-space-size=4096'],
      ['--import', './telemetry.mjs'],
      ['--cpu-prof'],
    ])
  })
})

// A TypeScript thread entry compiled once into one JavaScript file, kept between runs.
//
// Loading tsx in a thread costs about half a second of CPU (Node 20 starts a separate loader
// thread for every thread that registers hooks, then each module is transformed): more than
// parsing a small table, and paid by every parse, tile, quality and job thread. The bundle
// needs no hooks: the thread imports plain JavaScript. Packages stay outside the bundle and are
// loaded from node_modules as usual, so the bundle lives under node_modules/.cache.
import { createHash } from 'node:crypto'
import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs'
import { readFile } from 'node:fs/promises'
import { basename, join, resolve } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { threadId } from 'node:worker_threads'

const ROOT = fileURLToPath(new URL('../../', import.meta.url))
const CACHE = join(ROOT, 'node_modules', '.cache', 'stipple-threads')
/** Raised when the way bundles are made changes, so older bundles are made again. */
const FORMAT = 1

/**
 * The URL of the compiled bundle of `entryHref` (a .ts module), made now when any of its sources
 * changed since it was made (every input's size and modification time are recorded beside it).
 */
export async function bundledEntry(entryHref) {
  const source = fileURLToPath(entryHref)
  const id = createHash('sha256').update(source).digest('hex').slice(0, 12)
  const bundle = join(CACHE, `${basename(source, '.ts')}-${id}.mjs`)
  const manifest = `${bundle}.inputs.json`
  if (!isFresh(bundle, manifest)) await build(source, bundle, manifest)
  return pathToFileURL(bundle).href
}

function isFresh(bundle, manifest) {
  let recorded
  try {
    recorded = JSON.parse(readFileSync(manifest, 'utf8'))
  } catch {
    return false
  }
  if (recorded.format !== FORMAT || !statSync(bundle, { throwIfNoEntry: false })) return false
  return recorded.inputs.every(([path, mtimeMs, size]) => {
    const stat = statSync(path, { throwIfNoEntry: false })
    return stat?.mtimeMs === mtimeMs && stat.size === size
  })
}

async function build(source, bundle, manifest) {
  const { build: esbuild } = await import('esbuild')
  mkdirSync(CACHE, { recursive: true })
  // Threads (and processes) may build the same entry at once: each writes its own file and
  // renames it over, so a reader sees one whole bundle or the other.
  const temporary = `${bundle}.${process.pid}-${threadId}.tmp.mjs`
  const result = await esbuild({
    entryPoints: [source],
    outfile: temporary,
    absWorkingDir: ROOT,
    tsconfig: join(ROOT, 'tsconfig.json'),
    bundle: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    metafile: true,
    logLevel: 'silent',
    plugins: [packagesFromNodeModules, keepSourceUrls],
  })
  const inputs = [join(ROOT, 'tsconfig.json'), ...Object.keys(result.metafile.inputs)].map(
    (path) => {
      const absolute = resolve(ROOT, path)
      const { mtimeMs, size } = statSync(absolute)
      return [absolute, mtimeMs, size]
    },
  )
  renameSync(temporary, bundle)
  writeFileSync(
    `${manifest}.${process.pid}-${threadId}.tmp`,
    JSON.stringify({ format: FORMAT, inputs }),
  )
  renameSync(`${manifest}.${process.pid}-${threadId}.tmp`, manifest)
}

/**
 * Packages are imported from node_modules at run time, as without the bundle, but for those whose
 * entry is a JSON file: Node imports JSON only with an import attribute, so those are bundled.
 * (esbuild's own `packages: 'external'` cannot make that exception.)
 */
const packagesFromNodeModules = {
  name: 'packages-from-node-modules',
  setup(build) {
    build.onResolve({ filter: /^[^./]/ }, async (args) => {
      if (args.pluginData === 'resolving' || args.path.startsWith('node:')) return undefined
      const resolved = await build.resolve(args.path, {
        kind: args.kind,
        importer: args.importer,
        resolveDir: args.resolveDir,
        pluginData: 'resolving',
      })
      if (resolved.errors.length || !resolved.path.includes('/node_modules/')) return resolved
      return resolved.path.endsWith('.json') ? resolved : { path: args.path, external: true }
    })
  },
}

/**
 * Each module keeps its own `import.meta.url`: modules find their neighbours by it (nested
 * thread entries such as `new URL('./frc.thread.ts', import.meta.url)`, the client and demo
 * folders), which in one bundle would all point at the cache.
 */
const keepSourceUrls = {
  name: 'keep-source-urls',
  setup(build) {
    build.onLoad({ filter: /\.ts$/ }, async ({ path }) => {
      const text = await readFile(path, 'utf8')
      const url = JSON.stringify(pathToFileURL(path).href)
      return { contents: text.replaceAll('import.meta.url', url), loader: 'ts' }
    })
  },
}

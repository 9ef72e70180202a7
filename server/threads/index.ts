import { Worker, type WorkerOptions } from 'node:worker_threads'

/**
 * Worker threads, started one way: the shared bootstrap registers tsx where the entry is
 * TypeScript and loads it. `entry` is the module's URL (`new URL('./x.worker.ts', import.meta.url)`).
 */
const BOOTSTRAP = new URL('./thread-bootstrap.mjs', import.meta.url)

type Data = Record<string, unknown>

const LOADER_FLAGS = new Set(['--require', '-r', '--import', '--loader', '--experimental-loader'])
const TSX = /(^|[\\/])tsx([\\/]|$)/

/**
 * The process's Node flags without tsx's loader, each with its value. A thread runs its entry's
 * compiled bundle (thread-bundle.mjs) and needs no hooks, yet one that inherits them registers
 * them again and starts a loader thread of its own: a parse worker took 130–180 ms to be ready
 * with them, 65–75 without (measured on this machine), and several times that while the cores
 * were busy.
 */
export function withoutTsxLoader(argv: readonly string[]): string[][] {
  const kept: string[][] = []
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i]!
    const equals = arg.indexOf('=')
    const flag = equals < 0 ? arg : arg.slice(0, equals)
    if (!LOADER_FLAGS.has(flag)) {
      kept.push([arg])
      continue
    }
    const separate = equals < 0
    const value = separate ? (argv[i + 1] ?? '') : arg.slice(equals + 1)
    if (!TSX.test(value)) kept.push(separate ? [arg, value] : [arg])
    if (separate) i++
  }
  return kept
}

/**
 * Whether a thread may be given `flags`. V8 and process-wide options (the cluster's
 * `--single-threaded-gc`, `--max-old-space-size`) make the Worker constructor throw; a thread
 * shares them with the process anyway.
 */
function threadsAccept(flags: string[]): boolean {
  try {
    void new Worker('', { eval: true, execArgv: flags, stdout: true, stderr: true }).terminate()
    return true
  } catch {
    return false
  }
}

let threadFlags: string[] | null = null
/**
 * The flags threads start with, worked out once: none to test usually (tsx's are dropped), one
 * probe when all are accepted, one per flag only when some are not.
 */
function threadExecArgv(): string[] {
  if (threadFlags) return threadFlags
  const flags = withoutTsxLoader(process.execArgv)
  const all = flags.flat()
  threadFlags = all.length === 0 || threadsAccept(all) ? all : flags.filter(threadsAccept).flat()
  return threadFlags
}

export function startThread(
  entry: URL,
  options: WorkerOptions & { workerData?: Data } = {},
): Worker {
  // workerData stays an object: geotiff's web-worker shim reads fields of it when loaded in a thread.
  return new Worker(BOOTSTRAP, {
    execArgv: threadExecArgv(),
    ...options,
    workerData: { ...options.workerData, entry: entry.href },
  })
}

/** The options a Piscina pool needs to run `entry`'s default export through the same bootstrap. */
export function poolEntry(entry: URL, workerData: Data = {}) {
  return {
    filename: BOOTSTRAP.href,
    execArgv: threadExecArgv(),
    workerData: { ...workerData, entry: entry.href },
  }
}

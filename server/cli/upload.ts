import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { mkdir, stat } from 'node:fs/promises'
import { homedir } from 'node:os'
import { basename, dirname, join, resolve } from 'node:path'
import { MultiBar, Presets } from 'cli-progress'
import { Command, InvalidArgumentError } from 'commander'
import * as tus from 'tus-js-client'
import { Upload, type UrlStorage } from 'tus-js-client'
import { fileSlices } from './file-slices'

// The Node build exports a file-backed URL store that the package's typings leave out.
const { FileUrlStorage } = tus as unknown as { FileUrlStorage: new (path: string) => UrlStorage }

/**
 * stipple-upload: resumable uploads from an acquisition workstation. Interrupted uploads (network,
 * server restart, Ctrl-C) continue from the last byte the server has, also in a later run.
 */
interface Options {
  server: string
  token?: string
  dataset: string
  chunkMib: number
  retries: number
  state: string
  quiet?: boolean
}

/** Quick retries for blips and restarts, then longer waits for a real outage (capped at 30 s). */
const BACK_OFF = [500, 1000, 1000, 2000, 2000, 3000, 5000, 5000, 10_000, 15_000]
const RETRY_DELAYS = (n: number) => Array.from({ length: n }, (_, i) => BACK_OFF[i] ?? 30_000)
const positiveInt = (v: string) => {
  const n = Number(v)
  if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError('Give a positive whole number.')
  return n
}

async function sha256Of(path: string): Promise<string> {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path, {
    highWaterMark: 4 * 1024 * 1024,
  }) as AsyncIterable<Buffer>)
    hash.update(chunk)
  return hash.digest('hex')
}

async function serverChecksum(o: Options, token: string, fileId: string): Promise<string | null> {
  const res = await fetch(`${o.server}/api/datasets/${encodeURIComponent(o.dataset)}/files`, {
    headers: { authorization: `Bearer ${token}` },
  })
  if (!res.ok) return null
  const body = (await res.json()) as { items: { id: number; sha256: string | null }[] }
  return body.items.find((f) => String(f.id) === fileId)?.sha256 ?? null
}

function uploadOne(
  path: string,
  size: number,
  o: Options,
  token: string,
  bars: MultiBar | null,
): Promise<string> {
  const bar = bars?.create(size, 0, { file: basename(path).slice(0, 28).padEnd(28), speed: '' })
  const started = Date.now()
  return new Promise((done, fail) => {
    const upload = new Upload(createReadStream(path), {
      endpoint: `${o.server}/api/uploads`,
      headers: { Authorization: `Bearer ${token}` },
      metadata: { dataset: o.dataset, filename: basename(path) },
      uploadSize: size,
      chunkSize: o.chunkMib * 1024 * 1024,
      fileReader: fileSlices,
      retryDelays: RETRY_DELAYS(o.retries),
      urlStorage: new FileUrlStorage(o.state),
      storeFingerprintForResuming: true,
      removeFingerprintOnSuccess: true,
      // The same file sent to two datasets is two uploads.
      fingerprint: async () =>
        `stipple-${resolve(path)}-${size}-${(await stat(path)).mtimeMs}-${o.server}-${o.dataset}`,
      onProgress: (sent) => {
        const mibps = sent / 1024 / 1024 / Math.max(0.001, (Date.now() - started) / 1000)
        bar?.update(sent, { speed: `${mibps.toFixed(1)} MiB/s` })
      },
      onSuccess: (payload) => {
        bar?.update(size)
        done(payload.lastResponse.getHeader('Stipple-File-Id') ?? '')
      },
      onError: (err) => {
        // The server already holds exactly this file (a re-run, or a restart just after it was stored).
        const existing = alreadyStored(err)
        if (existing) {
          bar?.update(size)
          done(existing)
        } else fail(err)
      },
    })
    upload.findPreviousUploads().then((previous) => {
      if (previous[0]) upload.resumeFromPreviousUpload(previous[0])
      upload.start()
    }, fail)
  })
}

function alreadyStored(err: unknown): string | null {
  const res = (err as { originalResponse?: { getBody(): string } | null }).originalResponse
  try {
    const problem = JSON.parse(res?.getBody() ?? '') as { type?: string; existingFileId?: number }
    return problem.type === '/problems/duplicate-file' && problem.existingFileId
      ? String(problem.existingFileId)
      : null
  } catch {
    return null
  }
}

/** The server's own words from a failed request (problem+json detail), or the error message. */
function explain(err: unknown): string {
  const detailed = err as {
    originalResponse?: { getBody(): string; getStatus(): number } | null
    message?: string
  }
  const res = detailed.originalResponse
  if (res) {
    try {
      const problem = JSON.parse(res.getBody()) as { detail?: string }
      if (problem.detail) return `${problem.detail} (HTTP ${res.getStatus()})`
    } catch {
      if (res.getBody()) return `${res.getBody().trim()} (HTTP ${res.getStatus()})`
    }
  }
  return detailed.message ?? String(err)
}

async function main(files: string[], o: Options) {
  const token = o.token ?? process.env.STIPPLE_TOKEN
  if (!token)
    throw new InvalidArgumentError(
      'Give a personal access token with --token or the STIPPLE_TOKEN environment variable.',
    )
  o.server = o.server.replace(/\/$/, '')
  await mkdir(dirname(o.state), { recursive: true })
  const sizes = await Promise.all(files.map(async (f) => (await stat(f)).size))
  const bars =
    o.quiet || !process.stderr.isTTY
      ? null
      : new MultiBar(
          {
            format: ' {file} {bar} {percentage}% | {speed} | {eta_formatted} left',
            hideCursor: true,
          },
          Presets.shades_classic,
        )
  let failures = 0
  for (const [i, file] of files.entries()) {
    const local = sha256Of(file)
    try {
      const fileId = await uploadOne(file, sizes[i]!, o, token, bars)
      const [mine, theirs] = await Promise.all([local, serverChecksum(o, token, fileId)])
      if (theirs && theirs !== mine)
        throw new Error(`the server stored SHA-256 ${theirs}, but the file has ${mine}`)
      process.stdout.write(
        `${bars ? '\n' : ''}uploaded ${file} → file ${fileId}, sha256 ${mine}${theirs ? ' (verified)' : ''}\n`,
      )
    } catch (err) {
      failures++
      process.stderr.write(`${bars ? '\n' : ''}failed ${file}: ${explain(err)}\n`)
    }
  }
  bars?.stop()
  if (failures) {
    process.stderr.write(
      `${failures} of ${files.length} file${files.length > 1 ? 's' : ''} not uploaded. Interrupted uploads resume when you run the same command again.\n`,
    )
    process.exitCode = 1
  }
}

new Command('stipple-upload')
  .description('Upload files to a Stipple dataset, resumably.')
  .requiredOption('--server <url>', 'the Stipple address, e.g. https://hub.example.org')
  .option(
    '--token <token>',
    'a personal access token (or set STIPPLE_TOKEN, which keeps it out of your shell history)',
  )
  .requiredOption('--dataset <accession>', 'the dataset, by accession or id')
  .option('--chunk-mib <n>', 'bytes per request, MiB', positiveInt, 32)
  .option(
    '--retries <n>',
    'how many times to retry a failed request (waits grow up to 30 s)',
    positiveInt,
    20,
  )
  .option(
    '--state <file>',
    'where unfinished uploads are remembered',
    join(homedir(), '.stipple', 'uploads.json'),
  )
  .option('--quiet', 'no progress bars')
  .argument('<files...>', 'files to upload')
  .action(main)
  .showHelpAfterError()
  .parseAsync()
  .catch((err: unknown) => {
    process.stderr.write(`${err instanceof Error ? err.message : String(err)}\n`)
    process.exitCode = 2
  })

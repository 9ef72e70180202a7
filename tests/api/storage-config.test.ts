import { mkdtemp, rm } from 'node:fs/promises'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ConfigError, loadConfig } from '../../server/config'
import type { Logger } from '../../server/logger'
import {
  createObjectStore,
  describeStorage,
  waitForObjectStore,
} from '../../server/storage/object-storage'
import { startS3, type S3Fixture } from '../fixtures/s3'

let dataDir: string
beforeAll(async () => {
  dataDir = await mkdtemp(join(tmpdir(), 'stipple-storage-config-'))
})
afterAll(() => rm(dataDir, { recursive: true, force: true }))

const load = (env: Record<string, string>) => loadConfig({ DATA_DIR: dataDir, ...env })

function problem(env: Record<string, string>): string {
  try {
    load(env)
  } catch (err) {
    expect(err).toBeInstanceOf(ConfigError)
    return (err as Error).message
  }
  throw new Error('the configuration was accepted')
}

describe('choosing the storage by configuration', () => {
  it('keeps the data directory when STORAGE_URL is unset', () => {
    expect(load({}).storage).toEqual({ kind: 'local' })
  })

  it('reads an s3:// URL with its prefix, endpoint and credentials', () => {
    const config = load({
      STORAGE_URL: 's3://stipple-data/cluster/one',
      S3_ENDPOINT: 'http://127.0.0.1:9000/',
      S3_ACCESS_KEY_ID: 'key',
      S3_SECRET_ACCESS_KEY: 'secret',
    })
    expect(config.storage).toEqual({
      kind: 's3',
      bucket: 'stipple-data',
      prefix: 'cluster/one/',
      endpoint: 'http://127.0.0.1:9000',
      region: 'us-east-1',
      credentials: { accessKeyId: 'key', secretAccessKey: 'secret' },
      forcePathStyle: true,
    })
    const aws = load({ STORAGE_URL: 's3://stipple-data', S3_REGION: 'eu-central-1' }).storage
    expect(aws).toMatchObject({ prefix: '', endpoint: null, credentials: null })
    expect(aws).toMatchObject({ region: 'eu-central-1', forcePathStyle: false })
  })

  it('explains a malformed STORAGE_URL in words, without a stack', () => {
    expect(problem({ STORAGE_URL: 'bucket/prefix' })).toMatch(/s3:\/\/bucket\/prefix.*not a URL/)
    expect(problem({ STORAGE_URL: 'gs://bucket/x' })).toMatch(/"gs" is not a supported/)
    expect(problem({ STORAGE_URL: 's3://AB/x' })).toMatch(/bucket "AB".*3 to 63/)
    expect(problem({ STORAGE_URL: 's3://a:b@bucket/x' })).toMatch(/must not hold credentials/)
    expect(problem({ STORAGE_URL: 's3://bucket/a/../b' })).toMatch(/"\.\."/)
    expect(problem({ STORAGE_URL: 's3://bucket', S3_ENDPOINT: 'ftp://x' })).toMatch(
      /S3_ENDPOINT must be an http/,
    )
    expect(problem({ STORAGE_URL: 's3://bucket', S3_ACCESS_KEY_ID: 'k' })).toMatch(
      /set both or neither/,
    )
    expect(problem({ STORAGE_URL: 'nope' })).not.toMatch(/\n\s+at /)
  })
})

describe('object storage missing at start', () => {
  let s3: S3Fixture | null = null
  afterAll(() => s3?.stop())

  it('logs the reason, backs off and carries on once the store is up', async () => {
    const port = await freePort()
    const config = load({
      STORAGE_URL: 's3://stipple-late/x',
      S3_ENDPOINT: `http://127.0.0.1:${port}`,
      S3_ACCESS_KEY_ID: 'S3RVER',
      S3_SECRET_ACCESS_KEY: 'S3RVER',
    })
    const store = createObjectStore(config.storage, config.dataDir)
    const errors: string[] = []
    const logger: Logger = {
      error: (_f, message) => void errors.push(message),
      info: () => undefined,
      debug: () => undefined,
    }
    const pauses: number[] = []
    await waitForObjectStore(store, describeStorage(config.storage, config.dataDir), {
      logger,
      sleep: async (ms) => {
        pauses.push(ms)
        // The store comes up during the fourth pause.
        if (pauses.length === 4) s3 = await startS3('stipple-late', { port })
      },
      maxDelayMs: 4000,
    })
    store.close?.()
    expect(pauses).toEqual([1000, 2000, 4000, 4000])
    expect(errors).toHaveLength(4)
    expect(errors[0]).toBe(
      `object storage bucket "stipple-late" at http://127.0.0.1:${port} is not usable: nothing answers at that address (connection refused); retrying`,
    )
  })

  /** Waits `attempts` times without pausing, and returns why it gave up. */
  async function givesUp(env: Record<string, string>, attempts: number): Promise<string> {
    const config = load(env)
    const store = createObjectStore(config.storage, config.dataDir)
    const quiet: Logger = { error: () => undefined, info: () => undefined, debug: () => undefined }
    const options = { logger: quiet, sleep: async () => {}, attempts }
    const err = await waitForObjectStore(store, 'here', options).catch((e: Error) => e)
    store.close?.()
    return err instanceof Error ? err.message : 'it did not give up'
  }

  it('says when there are no credentials at all', async () => {
    expect(
      await givesUp({ STORAGE_URL: 's3://stipple-late/x', S3_ENDPOINT: s3!.endpoint }, 1),
    ).toBe(
      'Object storage here is not usable: no credentials were found (set S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or give the machine a role)',
    )
  })

  it('names a missing bucket, and gives up when told to', async () => {
    expect(await givesUp({ ...s3!.env(), STORAGE_URL: 's3://no-such-bucket/x' }, 2)).toBe(
      'Object storage here is not usable: the bucket does not exist (create it, or correct STORAGE_URL)',
    )
  })
})

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer()
    server.once('error', reject)
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as { port: number }
      server.close(() => resolve(port))
    })
  })
}

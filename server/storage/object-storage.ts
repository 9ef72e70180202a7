import type { Logger } from '../logger'
import { LocalObjectStore } from './local-object-store'
import { LocalStorage } from './local-storage'
import type { ObjectStore } from './object-store'
import { S3ObjectStore } from './s3-object-store'
import type { StorageConfig } from './storage-config'

/** The object store the configuration names: the data directory, or the S3 bucket. */
export function createObjectStore(config: StorageConfig, dataDir: string): ObjectStore {
  return config.kind === 's3' ? new S3ObjectStore(config) : new LocalObjectStore(dataDir)
}

/**
 * This node's storage for the configuration: the data directory alone, or the data directory as
 * this node's copy of the configured bucket.
 */
export function openNodeStorage(config: { storage: StorageConfig; dataDir: string }): LocalStorage {
  const bucket = config.storage.kind === 's3' ? new S3ObjectStore(config.storage) : null
  return new LocalStorage(config.dataDir, bucket)
}

/** Where the store is, for messages (no credentials). */
export function describeStorage(config: StorageConfig, dataDir: string): string {
  if (config.kind === 'local') return `the data directory ${dataDir}`
  const at = config.endpoint ?? `AWS region ${config.region}`
  return `bucket "${config.bucket}" at ${at}`
}

/** Why the store did not answer, in words an operator can act on. */
export function storageProblem(err: unknown): string {
  const e = err as { name?: string; code?: string; $metadata?: { httpStatusCode?: number } }
  const code = e.code ?? (err as { cause?: { code?: string } }).cause?.code
  const status = e.$metadata?.httpStatusCode
  if (e.name === 'CredentialsProviderError')
    return 'no credentials were found (set S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or give the machine a role)'
  if (code === 'ECONNREFUSED') return 'nothing answers at that address (connection refused)'
  if (code === 'ENOTFOUND' || code === 'EAI_AGAIN') return 'the host name does not resolve'
  if (code === 'ETIMEDOUT' || e.name === 'TimeoutError') return 'the connection timed out'
  if (status === 404 || e.name === 'NotFound' || e.name === 'NoSuchBucket')
    return 'the bucket does not exist (create it, or correct STORAGE_URL)'
  if (status === 403 || status === 401)
    return 'access was refused (check S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY and the bucket policy)'
  return `it answered with an error (${e.name ?? 'unknown'}${status ? `, HTTP ${status}` : ''})`
}

export interface WaitOptions {
  logger: Logger
  /** Injected so tests need not wait; resolves after the given milliseconds. */
  sleep: (ms: number) => Promise<void>
  firstDelayMs?: number
  maxDelayMs?: number
  /** Give up after this many failed attempts (default: never; the operator fixes the store). */
  attempts?: number
  signal?: AbortSignal
}

/**
 * Resolves once the store answers. Until then each failure is logged in words and retried after
 * a doubling pause (1 s up to 30 s): a store that is late to start or briefly away delays the
 * start instead of crashing it, so a supervisor does not restart the process in a loop.
 */
export async function waitForObjectStore(
  store: ObjectStore,
  where: string,
  options: WaitOptions,
): Promise<void> {
  const { logger, sleep, firstDelayMs = 1000, maxDelayMs = 30_000 } = options
  let delay = firstDelayMs
  for (let attempt = 1; ; attempt++) {
    try {
      await store.ping()
      if (attempt > 1) logger.info({ attempt }, `object storage ${where} answers now`)
      return
    } catch (err) {
      const problem = storageProblem(err)
      if (options.attempts !== undefined && attempt >= options.attempts)
        throw new Error(`Object storage ${where} is not usable: ${problem}`)
      logger.error(
        { attempt, retryInSeconds: delay / 1000 },
        `object storage ${where} is not usable: ${problem}; retrying`,
      )
    }
    if (options.signal?.aborted) throw new Error('Stopped while waiting for object storage')
    await sleep(delay)
    delay = Math.min(delay * 2, maxDelayMs)
  }
}

/**
 * At start on the S3 profile: waits (logging, backing off) until the bucket answers. The embedded
 * default has nothing to wait for.
 */
export async function objectStorageReady(
  config: { storage: StorageConfig; dataDir: string },
  logger: Logger,
): Promise<void> {
  if (config.storage.kind === 'local') return
  const store = createObjectStore(config.storage, config.dataDir)
  try {
    await waitForObjectStore(store, describeStorage(config.storage, config.dataDir), {
      logger,
      sleep: (ms) => new Promise((resolve) => setTimeout(resolve, ms)),
    })
  } finally {
    store.close?.()
  }
}

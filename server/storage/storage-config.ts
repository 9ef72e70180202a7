/**
 * Where bytes live, chosen by configuration alone: the data directory (the embedded default), or
 * an S3-compatible bucket when STORAGE_URL is `s3://bucket/prefix`.
 */
export type StorageConfig =
  | { kind: 'local' }
  | {
      kind: 's3'
      bucket: string
      /** Prepended to every key; empty, or ends with '/'. */
      prefix: string
      /** null: the provider's default endpoint for the region (AWS). */
      endpoint: string | null
      region: string
      /** null: the SDK's own credential chain (instance role, profile, …). */
      credentials: { accessKeyId: string; secretAccessKey: string } | null
      forcePathStyle: boolean
    }

export interface StorageEnv {
  STORAGE_URL?: string
  S3_ENDPOINT?: string
  S3_REGION: string
  S3_ACCESS_KEY_ID?: string
  S3_SECRET_ACCESS_KEY?: string
  S3_FORCE_PATH_STYLE?: boolean
}

// S3's bucket naming rules: 3–63 lowercase letters, digits, dots and hyphens, alphanumeric ends.
const BUCKET = /^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/

/** The storage choice, or the problems in words (no stack, no secrets echoed). */
export function parseStorageConfig(
  env: StorageEnv,
): { config: StorageConfig; problems: [] } | { config: null; problems: string[] } {
  if (!env.STORAGE_URL) return { config: { kind: 'local' }, problems: [] }
  const problems: string[] = []
  const shape = 'STORAGE_URL must look like s3://bucket/prefix'
  let url: URL | null = null
  try {
    url = new URL(env.STORAGE_URL)
  } catch {
    problems.push(`${shape} (it is not a URL)`)
  }
  if (url && url.protocol !== 's3:')
    problems.push(`${shape}; "${url.protocol.replace(/:$/, '')}" is not a supported storage kind`)
  if (url && url.protocol === 's3:') {
    if (url.username || url.password)
      problems.push(
        'STORAGE_URL must not hold credentials; use S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY',
      )
    if (url.search || url.hash) problems.push(`${shape}, without ? or #`)
    if (!BUCKET.test(url.hostname))
      problems.push(
        `STORAGE_URL names the bucket "${url.hostname}": a bucket name is 3 to 63 lowercase letters, digits, dots or hyphens`,
      )
  }
  const segments = url ? decodeURIComponent(url.pathname).split('/').filter(Boolean) : []
  // The URL parser resolves dot segments away; the operator's text is what is judged.
  const written = env.STORAGE_URL.replace(/^[a-z0-9]+:\/\/[^/]*/i, '').split('/')
  if (written.some((s) => s === '.' || s === '..' || /^(%2e|\.){1,2}$/i.test(s)))
    problems.push('STORAGE_URL: the prefix must not contain "." or ".." segments')
  if (env.S3_ENDPOINT) {
    try {
      const endpoint = new URL(env.S3_ENDPOINT)
      if (endpoint.protocol !== 'http:' && endpoint.protocol !== 'https:')
        problems.push('S3_ENDPOINT must be an http:// or https:// URL')
    } catch {
      problems.push('S3_ENDPOINT must be an http:// or https:// URL')
    }
  }
  if (Boolean(env.S3_ACCESS_KEY_ID) !== Boolean(env.S3_SECRET_ACCESS_KEY))
    problems.push('S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY go together: set both or neither')
  if (problems.length || !url) return { config: null, problems }
  return {
    config: {
      kind: 's3',
      bucket: url.hostname,
      prefix: segments.length ? `${segments.join('/')}/` : '',
      endpoint: env.S3_ENDPOINT?.replace(/\/$/, '') ?? null,
      region: env.S3_REGION,
      credentials:
        env.S3_ACCESS_KEY_ID && env.S3_SECRET_ACCESS_KEY
          ? { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY }
          : null,
      // Self-hosted S3-compatible services (and the test stand-in) usually has no per-bucket host names.
      forcePathStyle: env.S3_FORCE_PATH_STYLE ?? Boolean(env.S3_ENDPOINT),
    },
    problems: [],
  }
}

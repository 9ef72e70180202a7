import type { NextFunction, Request, Response } from 'express'

export const attachment = (name: string) =>
  `attachment; filename="${name.replace(/[^\x20-\x7e]|["\\]/g, '_')}"; filename*=UTF-8''${encodeURIComponent(name)}`

/** A stored file as a download: what it is called and its checksum, for the headers. */
export interface StoredDownload {
  path: string
  name: string
  sha256: string
  mediaType?: string | null
}

/**
 * Sends a stored file with Range requests, a strong ETag and RFC 9530 digests (Repr-Digest on
 * every response, Content-Digest when the body is the whole file). `audit` runs once for a
 * download that starts at byte 0 and is not answered from the client's cache, so ranges resuming
 * a download do not count again.
 */
export async function sendStoredFile(
  req: Request,
  res: Response,
  next: NextFunction,
  file: StoredDownload,
  audit: () => Promise<void>,
): Promise<void> {
  await prepareDownload(req, res, file, audit)
  res.type(file.mediaType ?? 'application/octet-stream')
  res.sendFile(
    file.path,
    {
      etag: false,
      lastModified: false,
      cacheControl: false,
      acceptRanges: true,
      dotfiles: 'allow',
    },
    (err) => {
      if (!err || res.headersSent) return
      const failure = err as Error & { status?: number; headers?: Record<string, string> }
      // An unsatisfiable range is the client's mistake: 416 with the size, as RFC 9110 15.5.17 asks.
      if (failure.status === 416)
        return void res
          .status(416)
          .set(failure.headers ?? {})
          .end()
      next(err)
    },
  )
}

/**
 * The headers every download of a stored file carries, and its audit (once for a download that
 * starts at byte 0 and is not answered from the client's cache).
 */
export async function prepareDownload(
  req: Request,
  res: Response,
  file: Omit<StoredDownload, 'path'>,
  audit: () => Promise<void>,
): Promise<void> {
  const digest = `sha-256=:${Buffer.from(file.sha256, 'hex').toString('base64')}:`
  const range = req.get('range')
  res.set({
    ETag: `"${file.sha256}"`,
    'Repr-Digest': digest,
    'Content-Disposition': attachment(file.name),
    'Cache-Control': 'private, no-cache',
  })
  if (!range) res.set('Content-Digest', digest)
  const startsDownload = !range || /^bytes=0-/.test(range.trim())
  if (startsDownload && req.get('if-none-match') !== `"${file.sha256}"`) await audit()
}

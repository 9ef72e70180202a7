import type { NextFunction, Request, Response } from 'express'
import { pipeline } from 'node:stream/promises'
import {
  RangeNotSatisfiableError,
  type ByteRange,
  type ObjectStore,
} from '../../storage/object-store'
import type { LocalStorage } from '../../storage/local-storage'
import { prepareDownload, sendStoredFile, type StoredDownload } from './send-stored-file'

/** One byte range of a Range header (`bytes=a-b`, `bytes=a-`, `bytes=-n`); else the whole file. */
function singleRange(header: string | undefined): ByteRange | undefined {
  const m = /^bytes=(\d*)-(\d*)$/.exec(header?.trim() ?? '')
  if (!m || (!m[1] && !m[2])) return undefined
  if (!m[1]) return { suffix: Number(m[2]) }
  return { start: Number(m[1]), ...(m[2] ? { end: Number(m[2]) } : {}) }
}

/**
 * The same download as sendStoredFile, its bytes streamed from the object store (the S3 profile):
 * the same digests and ETag, one byte range, 416 with the size for a range outside the file.
 */
export async function sendStoredObject(
  req: Request,
  res: Response,
  next: NextFunction,
  file: Omit<StoredDownload, 'path'> & { store: ObjectStore; key: string },
  audit: () => Promise<void>,
): Promise<void> {
  await prepareDownload(req, res, file, audit)
  res.set('Accept-Ranges', 'bytes')
  if (req.fresh) return void res.status(304).end()
  const range = singleRange(req.get('range'))
  let read
  try {
    read = await file.store.get(file.key, range)
  } catch (err) {
    if (err instanceof RangeNotSatisfiableError)
      return void res.status(416).set('Content-Range', `bytes */${err.size}`).end()
    return next(err)
  }
  if (range) res.status(206).set('Content-Range', `bytes ${read.start}-${read.end}/${read.size}`)
  res.type(file.mediaType ?? 'application/octet-stream')
  res.set('Content-Length', String(read.end - read.start + 1))
  if (req.method === 'HEAD') return void (read.stream.destroy(), res.end())
  await pipeline(read.stream, res).catch((err: Error) => res.destroy(err))
}

/**
 * A stored object as a download on either profile: from the bucket when it holds the key,
 * otherwise from the data folder (the embedded default; on the S3 profile an original uploaded
 * before uploads were written to the bucket is still only on the node that took it).
 */
export async function sendStored(
  req: Request,
  res: Response,
  next: NextFunction,
  file: Omit<StoredDownload, 'path'> & { storage: LocalStorage; key: string },
  audit: () => Promise<void>,
): Promise<void> {
  const { storage, key, ...about } = file
  if (storage.bucket && (await storage.bucket.head(key)))
    return sendStoredObject(req, res, next, { ...about, store: storage.bucket, key }, audit)
  return sendStoredFile(req, res, next, { ...about, path: storage.mirror.pathOf(key) }, audit)
}

import { defaultOptions, Upload, type PreviousUpload } from 'tus-js-client'
import { refusalOf } from '@/utils/uploadRefusal'

export const UPLOADS_ENDPOINT = '/api/uploads'
const CHUNK_SIZE = 16 * 1024 * 1024
// The first retry at once (a dropped keep-alive), then backing off over about 20 s.
const RETRY_DELAYS = [0, 1000, 3000, 5000, 10000]

export interface TransferEvents {
  onProgress(sent: number, total: number): void
  /** The server already held `offset` bytes: the transfer continues from there. */
  onResumedAt(offset: number): void
  onUploadId(uploadId: string): void
  onSuccess(fileId: number | null): void
  onError(error: unknown): void
}

export interface Transfer {
  start(): Promise<void>
  /** Stops sending; the server keeps what arrived, so `start()` continues from there. */
  pause(): Promise<void>
  /** Stops and asks the server to delete what arrived (tus termination frees the quota). */
  cancel(): Promise<void>
  /** Forget the stored resume point (the server refused the upload or finished it). */
  forget(): Promise<void>
}

export interface TransferTarget {
  /** The dataset's accession, as the upload metadata names it. */
  dataset: string
  /** An unfinished upload of this file the server holds, to continue instead of starting anew. */
  resumeUploadId?: string
}

const uploadUrl = (uploadId: string) => `${UPLOADS_ENDPOINT}/${encodeURIComponent(uploadId)}`

/** The upload id at the end of a tus upload URL (relative or absolute). */
export function uploadIdOf(url: string | null | undefined): string | null {
  if (!url) return null
  const last = url.split('?')[0]?.split('/').filter(Boolean).at(-1)
  return last ? decodeURIComponent(last) : null
}

const newest = (uploads: PreviousUpload[]) =>
  [...uploads].sort((a, b) => Date.parse(b.creationTime) - Date.parse(a.creationTime))[0]

/** One file's resumable transfer (tus 1.0.0). A browser's stored resume points are used first. */
export function createTransfer(
  file: File,
  target: TransferTarget,
  events: TransferEvents,
): Transfer {
  let looked = false
  let stopped = false
  const upload: Upload = new Upload(file, {
    endpoint: UPLOADS_ENDPOINT,
    uploadUrl: target.resumeUploadId ? uploadUrl(target.resumeUploadId) : null,
    metadata: { dataset: target.dataset, filename: file.name },
    chunkSize: CHUNK_SIZE,
    retryDelays: RETRY_DELAYS,
    // A finished file is registered on the server; its resume point would only mislead later.
    removeFingerprintOnSuccess: true,
    onProgress: (sent, total) => events.onProgress(sent, total),
    onUploadUrlAvailable: () => {
      const id = uploadIdOf(upload.url)
      if (id) events.onUploadId(id)
    },
    onAfterResponse: (req, res) => {
      if (req.getMethod() !== 'HEAD' || res.getStatus() >= 300) return
      const offset = Number(res.getHeader('Upload-Offset'))
      if (Number.isFinite(offset)) events.onResumedAt(offset)
    },
    onSuccess: ({ lastResponse }) => {
      const id = Number(lastResponse.getHeader('Stipple-File-Id'))
      events.onSuccess(Number.isInteger(id) && id > 0 ? id : null)
    },
    onError: (error) => events.onError(error),
  })

  async function resumeEarlier() {
    const earlier = (await upload.findPreviousUploads().catch(() => [])).filter(
      (p) => p.metadata.dataset === target.dataset && p.uploadUrl,
    )
    const chosen = newest(earlier)
    if (chosen) upload.resumeFromPreviousUpload(chosen)
  }

  return {
    async start() {
      stopped = false
      if (!looked) {
        looked = true
        await resumeEarlier()
      }
      if (!stopped) upload.start()
    },
    pause() {
      stopped = true
      return upload.abort()
    },
    cancel() {
      stopped = true
      return upload.abort(true)
    },
    forget: () => forgetStored(uploadIdOf(upload.url)),
  }
}

/** An unfinished upload this browser remembers (tus-js-client's stored resume points). */
export interface StoredUpload {
  uploadId: string
  name: string
  size: number | null
}

async function storedEntries(): Promise<PreviousUpload[]> {
  try {
    return await defaultOptions.urlStorage.findAllUploads()
  } catch {
    return [] // no storage (a private window, or outside a browser): nothing to resume
  }
}

/** The resume points this browser stored for uploads to one dataset. */
export async function storedUploads(dataset: string): Promise<StoredUpload[]> {
  return (await storedEntries()).flatMap((p) => {
    const uploadId = uploadIdOf(p.uploadUrl)
    if (!uploadId || p.metadata.dataset !== dataset) return []
    return [{ uploadId, name: p.metadata.filename ?? 'file', size: p.size }]
  })
}

export async function forgetStored(uploadId: string | null): Promise<void> {
  if (!uploadId) return
  const entries = (await storedEntries()).filter((p) => uploadIdOf(p.uploadUrl) === uploadId)
  await Promise.all(entries.map((p) => defaultOptions.urlStorage.removeUpload(p.urlStorageKey)))
}

/** Bytes the server holds of an unfinished upload, `gone` when it holds none any more. */
export type ServerOffset = number | 'gone' | 'unknown'

export async function serverOffset(uploadId: string): Promise<ServerOffset> {
  try {
    const res = await fetch(uploadUrl(uploadId), {
      method: 'HEAD',
      headers: { 'Tus-Resumable': '1.0.0' },
      credentials: 'same-origin',
    })
    if (res.status === 404 || res.status === 410) return 'gone'
    const offset = Number(res.headers.get('Upload-Offset'))
    return res.ok && Number.isFinite(offset) ? offset : 'unknown'
  } catch {
    return 'unknown'
  }
}

/** Deletes an unfinished upload on the server (freeing its quota) and the browser's note of it. */
export async function discardUpload(uploadId: string): Promise<void> {
  try {
    await Upload.terminate(uploadUrl(uploadId), { ...defaultOptions, retryDelays: [0, 1000] })
  } catch (error) {
    // Already gone on the server (expired, or finished elsewhere): only the note is left.
    if (![404, 410].includes(refusalOf(error).status)) throw error
  }
  await forgetStored(uploadId)
}

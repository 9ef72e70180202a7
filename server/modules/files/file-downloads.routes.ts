import { once } from 'node:events'
import type { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { Router, type Response } from 'express'
import { ZipArchive } from 'archiver'
import { idSchema } from '@shared/schemas/common.schema'
import { NotFoundError } from '../../errors/http-error'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import type { LocalStorage } from '../../storage/local-storage'
import { openStored } from '../../storage/stored-objects'
import { audit } from '../audit/audit.service'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { derivedPaths, rawStackKeysOf } from './file-job-kinds'
import { attachment } from './send-stored-file'
import { sendStored } from './send-stored-object'

const fileParams = datasetParams.extend({ fileId: idSchema })

/**
 * Downloads: one file with Range requests, a strong ETag and RFC 9530 digests (Repr-Digest on
 * every response, Content-Digest when the body is the whole file), and the whole dataset as a
 * streamed zip with its checksum manifest. One audit event per download, not per range.
 */
export function fileDownloadsRouter(storage: LocalStorage): Router {
  const router = Router({ mergeParams: true })

  router.get('/files/:fileId/content', async (req, res, next) => {
    const { id, fileId } = parseParams(fileParams, req)
    const dataset = await datasetFor(req, em(), id, 'download')
    const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
    if (!file || !file.sha256) throw new NotFoundError('file', fileId)
    const audited = async () => {
      audit(em(), req, {
        action: 'file.download',
        targetType: 'Dataset',
        targetId: dataset.accession,
        details: { file: file.name, range: req.get('range') ?? null },
      })
      await em().flush()
    }
    const about = { name: file.name, sha256: file.sha256, mediaType: file.mediaType }
    await sendStored(
      req,
      res,
      next,
      { ...about, storage, key: storage.originalKey(file.storageKey) },
      audited,
    )
  })

  /** What the raw-stack scan drew: the projection thumbnail and the per-frame mean trace (preview right). */
  for (const [route, pick, type] of [
    ['thumbnail.png', 'thumbnail', 'image/png'],
    ['frame-means.json', 'trace', 'application/json'],
  ] as const) {
    router.get(`/files/:fileId/${route}`, async (req, res) => {
      const { id, fileId } = parseParams(fileParams, req)
      const dataset = await datasetFor(req, em(), id, 'preview')
      const file = await em().findOne(DatasetFile, {
        id: fileId,
        dataset: dataset.id,
        kind: 'raw_stack',
        status: 'ready',
      })
      if (!file) throw new NotFoundError('scanned raw stack', fileId)
      res.set('Cache-Control', 'private, max-age=300')
      if (!storage.bucket) return void res.sendFile(derivedPaths(storage, file.id)[pick])
      // On the S3 profile streamed from the bucket: the node need not hold a copy.
      const stream = await openStored(storage, rawStackKeysOf(storage, file.id)[pick])
      res.type(type)
      await pipeline(stream, res).catch((err: Error) => res.destroy(err))
    })
  }

  router.get('/archive.zip', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'download')
    const files = await em().find(
      DatasetFile,
      { dataset: dataset.id, status: { $ne: 'rejected' }, sha256: { $ne: null } },
      { orderBy: { name: 'asc' } },
    )
    audit(em(), req, {
      action: 'dataset.download',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { files: files.length },
    })
    await em().flush()
    res.set({
      'Content-Type': 'application/zip',
      'Content-Disposition': attachment(`${dataset.accession}.zip`),
    })
    // Stored, not deflated: raw stacks and compressed tables gain little, and CPU is better spent elsewhere.
    const zip = new ZipArchive({ store: true, forceZip64: files.some((f) => f.size >= 0xffffffff) })
    zip.on('error', (err: Error) => res.destroy(err))
    zip.pipe(res)
    const prefix = `${dataset.accession}/`
    const manifest = files.map((f) => `${f.sha256}  ${f.name}\n`).join('')
    if (storage.bucket) {
      if (!(await zipFromBucket(zip, res, storage, prefix, manifest, files))) return
    } else {
      zip.append(manifest, { name: `${prefix}manifest-sha256.txt` })
      for (const f of files)
        zip.file(storage.originalPath(f.storageKey), { name: `${prefix}${f.name}` })
    }
    await zip.finalize()
  })

  return router
}

/**
 * The zip's manifest and members, the members read from the bucket, one at a time: archiver
 * queues what it is given, so each member's stream is opened only when the one before has gone
 * into the archive (else every file of a large dataset would hold an S3 connection open while
 * it waits). False when the client went away or a member could not be read (the response is
 * ended then).
 */
async function zipFromBucket(
  zip: ZipArchive,
  res: Response,
  storage: LocalStorage,
  prefix: string,
  manifest: string,
  files: IDatasetFile[],
): Promise<boolean> {
  const gone = new AbortController()
  res.once('close', () => res.writableFinished || gone.abort())
  const add = async (source: Readable | string, name: string, date?: Date) => {
    // Listening before appending: the entry may be written before append returns.
    const added = once(zip, 'entry', { signal: gone.signal })
    zip.append(source, { name: `${prefix}${name}`, date })
    await added
  }
  let source: Readable | null = null
  try {
    await add(manifest, 'manifest-sha256.txt')
    for (const f of files) {
      source = await openStored(storage, storage.originalKey(f.storageKey))
      await add(source, f.name, f.createdAt)
    }
    return true
  } catch (err) {
    source?.destroy()
    zip.abort()
    res.destroy(gone.signal.aborted ? undefined : (err as Error))
    return false
  }
}

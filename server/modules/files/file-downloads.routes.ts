import { Router } from 'express'
import { ZipArchive } from 'archiver'
import { idSchema } from '@shared/schemas/common.schema'
import { NotFoundError } from '../../errors/http-error'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import type { LocalStorage } from '../../storage/local-storage'
import type { ObjectStore } from '../../storage/object-store'
import { audit } from '../audit/audit.service'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { DatasetFile } from './dataset-file.entity'
import { derivedPaths } from './file-job-kinds'
import { attachment, sendStoredFile } from './send-stored-file'
import { sendStoredObject } from './send-stored-object'

const fileParams = datasetParams.extend({ fileId: idSchema })

/**
 * Downloads: one file with Range requests, a strong ETag and RFC 9530 digests (Repr-Digest on
 * every response, Content-Digest when the body is the whole file), and the whole dataset as a
 * streamed zip with its checksum manifest. One audit event per download, not per range.
 */
export function fileDownloadsRouter(
  storage: LocalStorage,
  /** On the S3 profile, where originals are read from (the store's `files/<storage key>`). */
  objects: ObjectStore | null = null,
): Router {
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
    const key = `files/${file.storageKey}`
    // Until uploads are written to the bucket too, an original uploaded on the S3 profile is still
    // on this node's disk; one moved by `admin migrate-to` is in the bucket.
    if (objects && (await objects.head(key)))
      await sendStoredObject(req, res, next, { ...about, store: objects, key }, audited)
    else
      await sendStoredFile(
        req,
        res,
        next,
        { ...about, path: storage.originalPath(file.storageKey) },
        audited,
      )
  })

  /** What the raw-stack scan drew: the projection thumbnail and the per-frame mean trace (preview right). */
  for (const [route, pick] of [
    ['thumbnail.png', 'thumbnail'],
    ['frame-means.json', 'trace'],
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
      res
        .set('Cache-Control', 'private, max-age=300')
        .sendFile(derivedPaths(storage, file.id)[pick])
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
    zip.append(files.map((f) => `${f.sha256}  ${f.name}\n`).join(''), {
      name: `${prefix}manifest-sha256.txt`,
    })
    for (const f of files)
      zip.file(storage.originalPath(f.storageKey), { name: `${prefix}${f.name}` })
    await zip.finalize()
  })

  return router
}

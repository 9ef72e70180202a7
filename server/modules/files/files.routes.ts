import type { AuditAction } from '@shared/domain/audit-actions'
import { Router, type Request, type RequestHandler } from 'express'
import { datasetSubject } from '@shared/permissions/abilities'
import { idSchema } from '@shared/schemas/common.schema'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import {
  columnMappingSchema,
  tableFormatChoiceSchema,
} from '@shared/schemas/localization-mapping.schema'
import { Job } from '../../jobs/job.entity'
import type { AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { UploadReservation } from '../uploads/upload-reservation.entity'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { fileDownloadsRouter } from './file-downloads.routes'
import { toFileValidation } from './file-report.mapper'
import { queueIngest, queueInspect } from './table-jobs.completions'

const fileParams = datasetParams.extend({ fileId: idSchema })

function toFileDto(
  f: IDatasetFile,
  job: { state: string; progress: number; message: string | null } | undefined,
) {
  return {
    id: f.id,
    name: f.name,
    size: f.size,
    sha256: f.sha256 ?? null,
    kind: f.kind,
    status: f.status,
    mediaType: f.mediaType ?? null,
    problem: f.problem ?? null,
    summary: summaryOf(f),
    job: job ?? null,
    createdAt: f.createdAt.toISOString(),
  }
}

/** A few facts for the list; the whole report is at /validation. */
function summaryOf(f: IDatasetFile): Record<string, unknown> | null {
  const r = f.report
  if (!r) return null
  if (f.kind === 'raw_stack')
    return {
      width: r.width,
      height: r.height,
      frames: r.frames,
      bitsPerSample: r.bitsPerSample,
      hasOmeXml: r.hasOmeXml,
    }
  return { rowsRead: r.rowsRead, rowsAccepted: r.rowsAccepted, rejected: r.rowsRejected }
}

/**
 * A dataset's files. The list is part of the description (names, sizes, checksums); the bytes and
 * the checksum manifest need the download right, which an embargo withholds.
 */
export function filesRouter(deps: Pick<AppDeps, 'storage' | 'jobs' | 'config'>): Router {
  const { storage, jobs } = deps
  const router = Router({ mergeParams: true })

  router.get('/files', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'read')
    const files = await em().find(
      DatasetFile,
      { dataset: dataset.id },
      { orderBy: { name: 'asc' } },
    )
    const jobs = files.length
      ? await em().find(Job, {
          file: { $in: files.map((f) => f.id) },
          state: { $in: ['queued', 'running'] },
        })
      : []
    const byFile = new Map(
      jobs.map((j) => [
        j.file!,
        { state: j.state, progress: j.progress, message: j.message ?? null },
      ]),
    )
    const uploads = req.ability.can('edit', datasetSubject(dataset))
      ? await em().find(UploadReservation, { dataset: dataset.id, user: req.user?.id ?? -1 })
      : []
    res.json({
      items: files.map((f) => toFileDto(f, byFile.get(f.id))),
      uploadsInProgress: uploads.map((u) => ({
        uploadId: u.uploadId,
        name: u.fileName,
        size: u.size,
        startedAt: u.createdAt.toISOString(),
      })),
    })
  })

  /** The validation report follows the preview right; the table's own text the download right. */
  router.get('/files/:fileId/validation', async (req, res) => {
    const { id, fileId } = parseParams(fileParams, req)
    const dataset = await datasetFor(req, em(), id, 'preview')
    const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
    if (!file) throw new NotFoundError('file', fileId)
    res.json(toFileValidation(file, req.ability.can('download', datasetSubject(dataset))))
  })

  /**
   * A depositor's correction to a localization table (its mapping or its format): the table must
   * be theirs to edit; the correction queues the table's work again and answers 202.
   */
  const tableCorrection =
    (
      action: AuditAction,
      queue: (req: Request, file: IDatasetFile) => Promise<object>,
    ): RequestHandler =>
    async (req, res) => {
      const { id, fileId } = parseParams(fileParams, req)
      const dataset = await datasetFor(req, em(), id, 'edit')
      const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
      if (!file) throw new NotFoundError('file', fileId)
      if (file.kind !== 'localization_table')
        throw new ConflictError(`"${file.name}" is not a localization table.`)
      const details = await queue(req, file)
      audit(em(), req, {
        action,
        targetType: 'Dataset',
        targetId: dataset.accession,
        details: { file: file.name, ...details },
      })
      await em().flush()
      jobs?.notify()
      res.status(202).json(toFileDto(file, { state: 'queued', progress: 0, message: null }))
    }

  /** The depositor confirms or corrects the column mapping; the table is (re-)ingested with it. */
  router.put(
    '/files/:fileId/mapping',
    requireUser,
    tableCorrection('file.mapping', async (req, file) => {
      await queueIngest(em(), file, parseBody(columnMappingSchema, req), deps.config)
      return {}
    }),
  )

  /** The depositor says how the fields are separated; the header is read again with that. */
  router.put(
    '/files/:fileId/format',
    requireUser,
    tableCorrection('file.format', async (req, file) => {
      const format = parseBody(tableFormatChoiceSchema, req)
      await queueInspect(em(), file, format)
      return { delimiter: format.delimiter }
    }),
  )

  router.delete('/files/:fileId', requireUser, async (req, res) => {
    const { id, fileId } = parseParams(fileParams, req)
    const dataset = await datasetFor(req, em(), id, 'edit')
    const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
    if (!file) throw new NotFoundError('file', fileId)
    audit(em(), req, {
      action: 'file.delete',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { file: file.name, sha256: file.sha256 },
    })
    em().remove(file)
    await em().flush()
    await storage.removeFile(file.storageKey, file.id)
    res.status(204).end()
  })

  /** One line per stored file, `<sha256>  <name>`, as `sha256sum -c` reads it. */
  router.get('/manifest.txt', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'download')
    const files = await em().find(
      DatasetFile,
      { dataset: dataset.id, status: { $ne: 'rejected' }, sha256: { $ne: null } },
      { orderBy: { name: 'asc' } },
    )
    res
      .type('text/plain; charset=utf-8')
      .set('content-disposition', `inline; filename="${dataset.accession}-manifest.txt"`)
      .send(files.map((f) => `${f.sha256}  ${f.name}\n`).join(''))
  })

  router.use(fileDownloadsRouter(storage))
  return router
}

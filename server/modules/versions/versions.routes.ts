import { Router } from 'express'
import {
  versionFileParamsSchema,
  versionParamsSchema,
} from '@shared/schemas/dataset-version.schema'
import { ConflictError, ForbiddenError, NotFoundError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import { clockOf, type AppDeps } from '../../services'
import { versionBlobKey } from '../../storage/stored-objects'
import { audit } from '../audit/audit.service'
import { recordCurationStep } from '../curation/curation.service'
import { findDataset, datasetParams } from '../datasets/dataset-access'
import { toDatasetDto } from '../datasets/dataset.mapper'
import { retryDoiRegistration } from '../doi/doi-registrar'
import { sendStored } from '../files/send-stored-object'
import { auditReviewedDownload } from '../reviewer-links/reviewer-access'
import { DatasetVersion, VersionFile } from './dataset-version.entity'
import { assertCanCurate, assertCanRevise, versionAccess } from './version-access'
import { getVersion, listVersions, startRevision } from './versions.service'

/** Approved, frozen versions of a dataset: read by whoever may read the dataset. */
export function versionsRouter(deps: AppDeps): Router {
  const router = Router({ mergeParams: true })
  const load = async (id: string) => {
    const dataset = await findDataset(em(), id)
    if (!dataset) throw new NotFoundError('dataset', id)
    return dataset
  }

  router.get('/versions', async (req, res) => {
    const dataset = await load(parseParams(datasetParams, req).id)
    const { filesOpen, onlyVersion } = versionAccess(req, dataset)
    const items = (await listVersions(em(), dataset.id)).filter(
      (v) => onlyVersion === null || v.number === onlyVersion,
    )
    res.json({ items: items.map((v) => (filesOpen ? v : { ...v, files: null })) })
  })

  router.get('/versions/:n', async (req, res) => {
    const { id, n } = parseParams(versionParamsSchema, req)
    const dataset = await load(id)
    const { filesOpen } = versionAccess(req, dataset, n)
    const version = await getVersion(em(), dataset, n)
    res.json(filesOpen ? version : { ...version, files: null })
  })

  /**
   * A frozen file's bytes, from the blob its checksum names: the version stays downloadable
   * whatever later drafts do to the dataset's own files.
   */
  router.get('/versions/:n/files/:fileId/content', async (req, res, next) => {
    const { id, n, fileId } = parseParams(versionFileParamsSchema, req)
    const dataset = await load(id)
    const access = versionAccess(req, dataset, n)
    const version = await em().findOne(DatasetVersion, { dataset: dataset.id, number: n })
    const file = version && (await em().findOne(VersionFile, { id: fileId, version: version.id }))
    if (!version || !file || !access.filesOpen) throw new NotFoundError('file', fileId)
    if (!access.download)
      throw new ForbiddenError(`Downloads of ${version.label} are not open to you.`)
    auditReviewedDownload(deps, req, res, dataset.id, `${version.label}/${file.name}`)
    const key = versionBlobKey(file.sha256)
    await sendStored(
      req,
      res,
      next,
      { storage: deps.storage, key, name: file.name, sha256: file.sha256 },
      async () => {
        audit(em(), req, {
          action: 'file.download',
          targetType: 'Dataset',
          targetId: dataset.accession,
          details: { file: file.name, version: version.label, range: req.get('range') ?? null },
        })
        await em().flush()
      },
    )
  })

  /** The depositor opens the next version of an approved dataset as a draft. */
  router.post('/versions', requireUser, async (req, res) => {
    const dataset = await load(parseParams(datasetParams, req).id)
    assertCanRevise(req, dataset)
    const number = startRevision(dataset)
    const now = clockOf(deps)()
    recordCurationStep(em(), dataset, { step: 'revision_started', actor: req.user!.id }, now)
    audit(em(), req, {
      action: 'dataset.revise',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { version: number },
    })
    await em().flush()
    res.status(201).json(await toDatasetDto(em(), dataset))
  })

  /** A steward retries a registration that failed (or is still waiting). */
  router.post('/versions/:n/doi', requireUser, async (req, res) => {
    const { id, n } = parseParams(versionParamsSchema, req)
    const dataset = await load(id)
    assertCanCurate(req, dataset)
    const version = await em().findOne(DatasetVersion, { dataset: dataset.id, number: n })
    if (!version) throw new NotFoundError('version', `${dataset.accession}.v${n}`)
    if (version.doiStatus === 'registered')
      throw new ConflictError(`${version.label} already has its DOI ${version.doi}.`)
    retryDoiRegistration(version, clockOf(deps)())
    audit(em(), req, {
      action: 'doi.retry',
      targetType: 'DatasetVersion',
      targetId: version.label,
    })
    await em().flush()
    deps.jobs?.notify()
    res.status(202).json(await getVersion(em(), dataset, n))
  })

  return router
}

import { Router } from 'express'
import { versionParamsSchema } from '@shared/schemas/dataset-version.schema'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import type { AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { recordCurationStep } from '../curation/curation.service'
import { findDataset, datasetParams } from '../datasets/dataset-access'
import { toDatasetDto } from '../datasets/dataset.mapper'
import { retryDoiRegistration } from '../doi/doi-registrar'
import { DatasetVersion } from './dataset-version.entity'
import { assertCanCurate, assertCanRevise, versionAccess } from './version-access'
import { getVersion, listVersions, startRevision } from './versions.service'

/** Approved, frozen versions of a dataset: read by whoever may read the dataset. */
export function versionsRouter(deps: Pick<AppDeps, 'jobs'> = {}): Router {
  const router = Router({ mergeParams: true })
  const load = async (id: string) => {
    const dataset = await findDataset(em(), id)
    if (!dataset) throw new NotFoundError('dataset', id)
    return dataset
  }

  router.get('/versions', async (req, res) => {
    const dataset = await load(parseParams(datasetParams, req).id)
    const { filesOpen } = versionAccess(req, dataset)
    const items = await listVersions(em(), dataset.id)
    res.json({ items: items.map((v) => (filesOpen ? v : { ...v, files: null })) })
  })

  router.get('/versions/:n', async (req, res) => {
    const { id, n } = parseParams(versionParamsSchema, req)
    const dataset = await load(id)
    const { filesOpen } = versionAccess(req, dataset)
    const version = await getVersion(em(), dataset, n)
    res.json(filesOpen ? version : { ...version, files: null })
  })

  /** The depositor opens the next version of an approved dataset as a draft. */
  router.post('/versions', requireUser, async (req, res) => {
    const dataset = await load(parseParams(datasetParams, req).id)
    assertCanRevise(req, dataset)
    const number = startRevision(dataset)
    const now = new Date()
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
    retryDoiRegistration(version, new Date())
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

import { Router, type Response } from 'express'
import { idSchema } from '@shared/schemas/common.schema'
import {
  createDatasetSchema,
  listDatasetsQuerySchema,
  reviewDatasetSchema,
  setEmbargoSchema,
  shareDatasetSchema,
  updateDatasetSchema,
} from '@shared/schemas/dataset.schema'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams, parseQuery } from '../../http/validate'
import { clockOf, type AppDeps } from '../../services'
import { filesRouter } from '../files/files.routes'
import { datasetMetadataRouter } from '../metadata/metadata.routes'
import { previewRouter } from '../preview/preview.routes'
import { qualityRouter } from '../quality/quality.routes'
import { curationThreadRouter } from '../curation/curation.routes'
import { versionsRouter } from '../versions/versions.routes'
import { datasetFor, datasetParams } from './dataset-access'
import { reviewDataset, setEmbargo, submitDataset } from './dataset-lifecycle.service'
import { toDatasetPageDto } from './dataset.mapper'
import { listShares, revokeShare, shareDataset } from './dataset-shares.service'
import { DatasetCatalogue } from './dataset-catalogue'
import { listReader } from './dataset-list-reader'
import { ReadConnection } from '../common/read-connection'
import { createDataset, deleteDataset, updateDataset } from './datasets.service'
import { reviewerLinksRouter } from '../reviewer-links/reviewer-links.routes'
import { anonymousReview } from '../reviewer-links/reviewer-access'
import { anonymiseDataset } from '../reviewer-links/anonymise'

const shareParams = datasetParams.extend({ shareId: idSchema })

export function datasetsRouter(deps: AppDeps): Router {
  // Embargo ends and curation steps are judged by the app's clock (tests inject theirs).
  const now = clockOf(deps)
  const router = Router()
  const catalogue = new DatasetCatalogue(listReader(deps.reads ?? new ReadConnection(deps.orm)))
  const target = (
    req: Parameters<typeof datasetFor>[0],
    action: Parameters<typeof datasetFor>[3],
  ) => datasetFor(req, em(), parseParams(datasetParams, req).id, action)

  // Server-Timing says whether a page came from the list's cache, or how long the database took.
  // Written straight to the response: the body is ready-made JSON bytes, so Express's send (type
  // lookup, freshness check, body conversion) would only add work to the busiest route.
  const sendPage = (res: Response, body: Buffer, dbMs: number | null) => {
    res
      .writeHead(200, {
        'Content-Type': 'application/json; charset=utf-8',
        'Content-Length': body.length,
        'Server-Timing': dbMs === null ? 'cache' : `db;dur=${dbMs.toFixed(2)}`,
      })
      .end(body)
  }
  router.get('/', (req, res) => {
    const query = parseQuery(listDatasetsQuerySchema, req)
    // A cached page goes out in the same turn; only a miss waits for the database.
    const cached = catalogue.cached(req, query)
    if (cached) return sendPage(res, cached, null)
    return catalogue.list(em, req, query).then((page) => sendPage(res, page.body, page.dbMs))
  })

  router.post('/', requireUser, async (req, res) => {
    const dto = await createDataset(em(), req, parseBody(createDatasetSchema, req))
    res.status(201).location(`/api/datasets/${dto.accession}`).json(dto)
  })

  router.get('/:id', async (req, res) => {
    const dataset = await target(req, 'read')
    const dto = await toDatasetPageDto(em(), dataset)
    res.json(anonymousReview(req, dataset) ? anonymiseDataset(dto) : dto)
  })

  router.patch('/:id', requireUser, async (req, res) => {
    const dataset = await target(req, 'edit')
    res.json(await updateDataset(em(), req, dataset, parseBody(updateDatasetSchema, req)))
  })

  router.delete('/:id', requireUser, async (req, res) => {
    await deleteDataset(em(), req, await target(req, 'delete'), deps.storage)
    res.status(204).end()
  })

  router.post('/:id/submit', requireUser, async (req, res) => {
    res.json(await submitDataset(em(), req, deps, await target(req, 'submit'), now()))
  })

  router.post('/:id/review', requireUser, async (req, res) => {
    const dataset = await target(req, 'curate')
    await reviewDataset(em(), req, deps, dataset, parseBody(reviewDatasetSchema, req), now())
    res.json(await toDatasetPageDto(em(), dataset))
  })

  router.put('/:id/embargo', requireUser, async (req, res) => {
    const dataset = await target(req, 'embargo')
    res.json(await setEmbargo(em(), req, deps, dataset, parseBody(setEmbargoSchema, req), now()))
  })

  router.get('/:id/shares', requireUser, async (req, res) => {
    res.json({ items: await listShares(em(), await target(req, 'share')) })
  })

  router.post('/:id/shares', requireUser, async (req, res) => {
    const dataset = await target(req, 'share')
    const { share, created } = await shareDataset(
      em(),
      req,
      deps,
      dataset,
      parseBody(shareDatasetSchema, req),
    )
    res.status(created ? 201 : 200).json(share)
  })

  router.delete('/:id/shares/:shareId', requireUser, async (req, res) => {
    const { id, shareId } = parseParams(shareParams, req)
    await revokeShare(em(), req, await datasetFor(req, em(), id, 'share'), shareId)
    res.status(204).end()
  })

  router.use('/:id/reviewer-links', reviewerLinksRouter(deps))
  router.use('/:id', datasetMetadataRouter(deps))
  router.use('/:id', filesRouter(deps))
  router.use('/:id', qualityRouter(deps))
  router.use('/:id', versionsRouter(deps))
  router.use('/:id', curationThreadRouter(deps))
  if (deps.previews) router.use('/:id', previewRouter(deps.previews))

  return router
}

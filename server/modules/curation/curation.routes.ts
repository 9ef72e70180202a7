import { Router } from 'express'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import { clockOf, type AppDeps } from '../../services'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { assertCanReadThread, curationThread } from './curation.service'
import { stewardWorkQueue } from './work-queue.service'

/** `GET /api/datasets/:id/curation`: the curation thread, for depositors and stewards only. */
export function curationThreadRouter(deps: Pick<AppDeps, 'config' | 'clock'>): Router {
  const router = Router({ mergeParams: true })
  router.get('/curation', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'read')
    assertCanReadThread(req.ability, dataset)
    res.json(await curationThread(em(), dataset, deps.config.embargo, clockOf(deps)()))
  })
  return router
}

/** `GET /api/curation/queue`: the steward's work queue (empty lists for anyone else). */
export function curationQueueRouter(): Router {
  const router = Router()
  router.get('/queue', requireUser, async (req, res) => {
    res.json(await stewardWorkQueue(em(), req.ability, new Date()))
  })
  return router
}

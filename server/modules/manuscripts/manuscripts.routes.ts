import { Router, type Request } from 'express'
import { z } from 'zod'
import { idSchema } from '@shared/schemas/common.schema'
import { attachDatasetSchema, createManuscriptSchema } from '@shared/schemas/manuscript.schema'
import { requireUser, signedInUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import { clockOf, type AppDeps } from '../../services'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import {
  attachDataset,
  createManuscript,
  detachDataset,
  listJournals,
  listManuscripts,
  manuscriptsOfDataset,
} from './manuscripts.service'

const manuscriptParams = z.object({ id: idSchema })
const detachParams = manuscriptParams.extend({ dataset: z.string().min(1).max(40) })

/** /api/journals, /api/manuscripts and /api/datasets/:id/manuscripts. */
export function manuscriptsRouter(deps: AppDeps): Router {
  const router = Router()
  const now = clockOf(deps)
  const actor = (req: Request) => Object.assign(req, { user: signedInUser(req) })

  router.get('/journals', requireUser, async (_req, res) => {
    res.json({ items: await listJournals(em()) })
  })
  router.get('/manuscripts', requireUser, async (req, res) => {
    res.json({ items: await listManuscripts(em(), actor(req), now()) })
  })
  router.post('/manuscripts', requireUser, async (req, res) => {
    const input = parseBody(createManuscriptSchema, req)
    res.status(201).json(await createManuscript(em(), actor(req), input, now()))
  })
  router.post('/manuscripts/:id/datasets', requireUser, async (req, res) => {
    const { id } = parseParams(manuscriptParams, req)
    const input = parseBody(attachDatasetSchema, req)
    res.json(await attachDataset(em(), actor(req), id, input, now()))
  })
  router.delete('/manuscripts/:id/datasets/:dataset', requireUser, async (req, res) => {
    const { id, dataset } = parseParams(detachParams, req)
    await detachDataset(em(), actor(req), id, dataset)
    res.status(204).end()
  })
  router.get('/datasets/:id/manuscripts', requireUser, async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'read')
    res.json({ items: await manuscriptsOfDataset(em(), actor(req), dataset, now()) })
  })
  return router
}

import { Router } from 'express'
import type { AppDeps } from '../../services'
import { CommentsService } from '../comments/comments.service'
import { commentsRouter } from '../comments/comments.routes'
import { DatasetEventHub } from '../events/dataset-events'
import { eventsRouter } from '../events/events.routes'
import { regionMeasurementsRouter } from '../region-measurements/region-measurements.routes'
import { regionsRouter } from './regions.routes'
import { RegionsService } from './regions.service'

/**
 * Regions of interest, their threads and the live stream of both, sharing one event hub so a
 * region drawn or a comment posted reaches every open page of the dataset.
 */
export function collaborationRouter(deps: AppDeps): Router {
  const hub = deps.eventRelay ? new DatasetEventHub(deps.eventRelay) : new DatasetEventHub()
  const clock = deps.clock ?? (() => new Date())
  const router = Router()
  const regions = new RegionsService(hub, clock)
  router.use(regionsRouter(deps, regions))
  router.use(regionMeasurementsRouter(deps, regions))
  router.use(commentsRouter(deps, new CommentsService(deps, hub, clock)))
  router.use(eventsRouter(hub))
  return router
}

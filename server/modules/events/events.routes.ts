import { Router } from 'express'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import { presentComment, type CommentFacts } from '../comments/comments.service'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { presentRegion, type RegionFacts } from '../regions/regions.service'
import type { DatasetEvent, DatasetEventHub } from './dataset-events'

/** A comment line every so often keeps proxies from closing a quiet stream. */
const HEARTBEAT_MS = 25_000

/**
 * `GET /api/datasets/:id/events`: new and changed comments and regions as server-sent events,
 * for those who may read the discussion (the preview right; 404/403 otherwise, like every
 * dataset route). Each event is presented to this reader as the lists present it.
 */
export function eventsRouter(hub: DatasetEventHub): Router {
  const router = Router()
  router.get('/datasets/:id/events', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'preview')
    res.writeHead(200, {
      'content-type': 'text/event-stream; charset=utf-8',
      'cache-control': 'private, no-cache, no-transform',
      connection: 'keep-alive',
      // Reverse proxies must pass each event on at once rather than buffer the stream.
      'x-accel-buffering': 'no',
    })
    res.write('retry: 3000\n\n')

    const present = (event: DatasetEvent) => {
      if (event.name.startsWith('comment.')) return presentComment(event.data as CommentFacts, req)
      if (event.name === 'region.deleted') return event.data
      return presentRegion(event.data as RegionFacts, req)
    }
    const stop = hub.subscribe(dataset.id, (event) => {
      res.write(`event: ${event.name}\ndata: ${JSON.stringify(present(event))}\n\n`)
    })
    const heartbeat = setInterval(() => res.write(': still here\n\n'), HEARTBEAT_MS)
    heartbeat.unref()
    req.on('close', () => {
      clearInterval(heartbeat)
      stop()
    })
  })
  return router
}

import { Router } from 'express'
import { createCommentSchema } from '@shared/schemas/comment.schema'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { addComment, listComments } from './comments.service'
import { anonymousReview } from '../reviewer-links/reviewer-access'

/** Discussion on a dataset: reading needs the preview right, writing the annotate right. */
export function commentsRouter(): Router {
  const router = Router({ mergeParams: true })
  router.get('/', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'preview')
    // Comments carry their authors' names: an anonymous reviewer gets none.
    res.json({ items: anonymousReview(req, dataset) ? [] : await listComments(em(), dataset) })
  })
  router.post('/', requireUser, async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'annotate')
    res.status(201).json(await addComment(em(), req, dataset, parseBody(createCommentSchema, req)))
  })
  return router
}

import { Router, type Request } from 'express'
import { z } from 'zod'
import { idSchema } from '@shared/schemas/common.schema'
import {
  createCommentSchema,
  editCommentSchema,
  listCommentsQuerySchema,
} from '@shared/schemas/comment.schema'
import { ForbiddenError, NotFoundError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { perMinuteLimit } from '../../http/rate-limit'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams, parseQuery } from '../../http/validate'
import type { AppDeps } from '../../services'
import { datasetFor, datasetParams, subjectOf } from '../datasets/dataset-access'
import { Dataset } from '../datasets/dataset.entity'
import { Comment } from './comment.entity'
import type { CommentsService } from './comments.service'
import { anonymousReview } from '../reviewer-links/reviewer-access'

const commentParams = z.object({ id: idSchema })

/**
 * Threads on a dataset and its regions: reading needs the preview right, writing the annotate
 * right. Posting is limited per account (a script gone wild gets 429, not a flood of mail).
 */
export function commentsRouter(deps: Pick<AppDeps, 'config'>, comments: CommentsService): Router {
  const router = Router()
  const postLimit = perMinuteLimit('comments', deps.config.comments.perMinute, {
    keyGenerator: (req) => `user:${req.user?.id ?? 0}`,
  })

  router.get('/datasets/:id/comments', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'preview')
    const { regionId } = parseQuery(listCommentsQuerySchema, req)
    // Comments carry their authors' names: an anonymous reviewer gets none.
    if (anonymousReview(req, dataset)) return void res.json({ items: [] })
    res.json({ items: await comments.list(em(), req, dataset, regionId) })
  })

  router.post('/datasets/:id/comments', requireUser, postLimit, async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'annotate')
    res
      .status(201)
      .json(await comments.add(em(), req, dataset, parseBody(createCommentSchema, req)))
  })

  /** A comment the asker may act on: 404 unless they may read the thread, 403 unless annotate. */
  async function target(req: Request) {
    const { id } = parseParams(commentParams, req)
    const comment = await em().findOne(Comment, { id })
    const dataset = comment && (await em().findOne(Dataset, { id: comment.dataset }))
    if (!comment || !dataset || !req.ability.can('preview', subjectOf(dataset)))
      throw new NotFoundError('comment', id)
    if (!req.ability.can('annotate', subjectOf(dataset)))
      throw new ForbiddenError(`The discussion on ${dataset.accession} is closed to you now.`)
    return { comment, dataset }
  }

  router.patch('/comments/:id', requireUser, async (req, res) => {
    const { comment, dataset } = await target(req)
    res.json(await comments.edit(em(), req, dataset, comment, parseBody(editCommentSchema, req)))
  })
  router.post('/comments/:id/resolve', requireUser, async (req, res) => {
    res.json(await comments.setResolved(em(), req, (await target(req)).comment, true))
  })
  router.post('/comments/:id/reopen', requireUser, async (req, res) => {
    res.json(await comments.setResolved(em(), req, (await target(req)).comment, false))
  })

  router.get('/me/mentions', requireUser, async (req, res) => {
    res.json({ items: await comments.mentionsOf(em(), req) })
  })
  return router
}

import { Router } from 'express'
import { idSchema } from '@shared/schemas/common.schema'
import { createReviewerLinkSchema } from '@shared/schemas/reviewer-link.schema'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import { clockOf, type AppDeps } from '../../services'
import { authorise, datasetParams, findDataset } from '../datasets/dataset-access'
import { createReviewerLink, listReviewerLinks, revokeReviewerLink } from './reviewer-links.service'

const linkParams = datasetParams.extend({ linkId: idSchema })

/** /api/datasets/:id/reviewer-links: owners and the manuscript's editors hand out and revoke links. */
export function reviewerLinksRouter(deps: AppDeps): Router {
  const router = Router({ mergeParams: true })
  const now = clockOf(deps)
  const context = () => ({ config: deps.config, now: now() })

  /** The matrix refuses links for drafts (403, saying why); the service checks it again. */
  async function linkableDataset(req: Parameters<typeof authorise>[0], id: string) {
    return authorise(req, await findDataset(em(), id), id, 'reviewer_link')
  }

  router.post('/', requireUser, async (req, res) => {
    const { id } = parseParams(datasetParams, req)
    const dataset = await linkableDataset(req, id)
    const input = parseBody(createReviewerLinkSchema, req)
    res.status(201).json(await createReviewerLink(em(), req, dataset, input, context()))
  })

  router.get('/', requireUser, async (req, res) => {
    const { id } = parseParams(datasetParams, req)
    const dataset = authorise(req, await findDataset(em(), id), id, 'reviewer_link')
    res.json({ items: await listReviewerLinks(em(), dataset, context()) })
  })

  router.delete('/:linkId', requireUser, async (req, res) => {
    const { id, linkId } = parseParams(linkParams, req)
    const dataset = authorise(req, await findDataset(em(), id), id, 'reviewer_link')
    await revokeReviewerLink(em(), req, dataset, linkId, now())
    res.status(204).end()
  })
  return router
}

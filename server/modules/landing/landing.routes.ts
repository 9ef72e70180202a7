import { Router, type Request, type Response } from 'express'
import { z } from 'zod'
import { requestEm as em } from '../../http/request-context'
import type { AppDeps } from '../../services'
import { reviewedVersion } from '../reviewer-links/reviewer-access'
import { landingPage, notFoundPage } from './landing-page'
import { landingView, type LandingView } from './landing.service'

export interface LandingDeps extends Pick<AppDeps, 'config'> {
  /** The clock embargo ends are judged by (tests pass their own). */
  clock?: () => Date
}

const params = z.object({
  accession: z.string().max(40),
  n: z
    .string()
    .regex(/^[1-9]\d{0,5}$/)
    .optional(),
})
const FORMATS = {
  'cite.bib': 'application/x-bibtex',
  'cite.ris': 'application/x-research-info-systems',
}

/**
 * Public landing pages, rendered here so crawlers and link checkers read them without running
 * the client: /d/:accession (newest version), /d/:accession/v/:n, and each version's BibTeX and
 * RIS. Anything not public answers the same 404 page, so nothing about it leaks.
 */
export function landingRouter(deps: LandingDeps): Router {
  const router = Router()
  const now = deps.clock ?? (() => new Date())

  const notFound = (res: Response) =>
    res.status(404).type('html').set('cache-control', 'no-store').send(notFoundPage())

  async function viewOf(req: Request) {
    const parsed = params.safeParse(req.params)
    if (!parsed.success) return null
    const n = parsed.data.n === undefined ? null : Number(parsed.data.n)
    return landingView(em(), deps.config.publicUrl, parsed.data.accession, n, now(), (id) =>
      reviewedVersion(req, id),
    )
  }
  const page = (res: Response, view: LandingView | null) =>
    view
      ? res
          .type('html')
          .set('cache-control', view.forReviewer ? 'private, no-store' : 'no-cache')
          .send(landingPage(view))
      : notFound(res)

  router.get('/:accession', async (req, res) => page(res, await viewOf(req)))
  router.get('/:accession/v/:n', async (req, res) => page(res, await viewOf(req)))
  router.get('/:accession/v/:n/:format', async (req, res) => {
    const format = req.params.format as keyof typeof FORMATS
    const view = format in FORMATS ? await viewOf(req) : null
    if (!view || view.kind === 'withdrawn') return notFound(res)
    const c = view.citations
    res
      .type(FORMATS[format])
      .set(
        'content-disposition',
        `attachment; filename="${view.subject.accession}-v${view.version.number}.${format.slice(5)}"`,
      )
      .send(format === 'cite.bib' ? c.bibtex : c.ris)
  })
  router.use((_req, res) => notFound(res))
  return router
}

import { Router } from 'express'
import { escapeHtml, renderPage } from '../../http/html-page'
import { perMinuteLimit } from '../../http/rate-limit'
import { requestEm as em } from '../../http/request-context'
import { clockOf, type AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { openedLinkIds, setOpenedLinks } from './reviewer-access'
import { resolveReviewerToken, type TokenVerdict } from './reviewer-links.service'

type Refusal = Extract<TokenVerdict, { ok: false }>['reason']

/** What the reviewer is told; the same words whether a token was guessed or mistyped. */
const REFUSALS: Record<Refusal, { status: number; title: string; text: string }> = {
  unknown: {
    status: 404,
    title: 'This reviewer link does not work',
    text: 'The link is not known here. Check that it was copied whole, or ask the journal for a new one.',
  },
  expired: {
    status: 410,
    title: 'This reviewer link has expired',
    text: 'Reviewer links work for a limited time. Ask the journal editor or the authors for a new one.',
  },
  revoked: {
    status: 410,
    title: 'This reviewer link was withdrawn',
    text: 'The authors or the journal closed this link. Ask the journal editor if you still need the data.',
  },
  withdrawn: {
    status: 410,
    title: 'This dataset is no longer open for review',
    text: 'The dataset behind this link was withdrawn or sent back to its authors.',
  },
}

/**
 * GET /r/:token: checks the link, remembers it in a signed cookie (so the token never travels
 * again, nor sits in the address bar, history or Referer of the data pages) and sends the browser
 * to the dataset's page. Failures, and every request here, count against a per-address limit.
 */
export function reviewerEntryRouter(deps: AppDeps): Router {
  const router = Router()
  const now = clockOf(deps)
  router.use(perMinuteLimit('reviewer-links', deps.config.rateLimitSignIn))
  router.get('/:token', async (req, res) => {
    res.set({ 'Cache-Control': 'no-store', 'Referrer-Policy': 'no-referrer' })
    const verdict = await resolveReviewerToken(em(), req.params.token ?? '', now())
    if (!verdict.ok) {
      const refusal = REFUSALS[verdict.reason]
      res
        .status(refusal.status)
        .type('html')
        .send(
          renderPage({
            title: refusal.title,
            body: `<h1>${escapeHtml(refusal.title)}</h1><p>${escapeHtml(refusal.text)}</p><p>No data is shown through this link.</p>`,
          }),
        )
      return
    }
    const { link, dataset } = verdict
    audit(em(), req, {
      action: 'reviewer_link.use',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { link: link.id, opened: true },
    })
    await em().flush()
    const opened = openedLinkIds(req, deps.config.sessionSecrets).filter((id) => id !== link.id)
    setOpenedLinks(req, res, deps, [...opened, link.id])
    // A later version has been opened since the link was made: the linked version is frozen and
    // shown on its own page, not the dataset's working draft.
    res.redirect(
      303,
      link.version < dataset.version
        ? `/d/${dataset.accession}/v/${link.version}`
        : `/datasets/${dataset.accession}?review=1`,
    )
  })
  return router
}

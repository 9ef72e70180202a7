import type { Request, RequestHandler, Response } from 'express'
import { defineAbilityFor, type AppAbility } from '@shared/permissions/abilities'
import { requestEm } from '../../http/request-context'
import { clockOf, type AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { subjectOf, type DatasetFacts } from '../datasets/dataset-access'
import { liveLinksAmong, type LiveLink } from './reviewer-links.service'
import { signLinkIds, verifyLinkIds } from './reviewer-link-token'

/** The cookie that carries the opened links' ids (signed) from /r/:token to the data routes. */
export const REVIEW_COOKIE = 'stipple.review'
/** How long a browser keeps a link it opened; the link's own expiry still applies on every request. */
export const REVIEW_COOKIE_MS = 8 * 3600_000
/** A browser keeps at most this many opened links (the oldest goes first). */
const MAX_LINKS_PER_BROWSER = 20

interface Reviewing {
  links: LiveLink[]
  /** The abilities the person has without any link (to tell when anonymity applies). */
  own: AppAbility
}
const reviewing = new WeakMap<Request, Reviewing>()

/** The review cookie's raw value (its characters need no decoding: digits, '.', '~', base64url). */
function reviewCookie(req: Request): string | undefined {
  const header = req.headers.cookie
  if (!header?.includes(REVIEW_COOKIE)) return undefined
  for (const part of header.split(';')) {
    const [name, ...value] = part.trim().split('=')
    if (name === REVIEW_COOKIE) return value.join('=')
  }
  return undefined
}

export const openedLinkIds = (req: Request, secrets: readonly string[]) =>
  verifyLinkIds(secrets, reviewCookie(req))

export function setOpenedLinks(
  req: Request,
  res: Response,
  deps: Pick<AppDeps, 'config'>,
  ids: readonly number[],
): void {
  const value = signLinkIds(deps.config.sessionSecrets[0]!, ids.slice(-MAX_LINKS_PER_BROWSER))
  res.cookie(REVIEW_COOKIE, value, {
    httpOnly: true,
    sameSite: 'lax',
    secure: deps.config.secureCookies || req.secure,
    maxAge: REVIEW_COOKIE_MS,
    path: '/',
    encode: String,
  })
}

/** Routes that hand out bytes: each request through a link there is one audited use. */
const DOWNLOAD_PATH =
  /^\/api\/datasets\/([^/]+)\/(files\/\d+\/content|archive\.zip|manifest\.txt|export\/[a-z-]+)$/

/**
 * Adds the reviewer rows of the matrix for the datasets of the live links this browser opened.
 * Each link is checked in the database on every request, so revoking or expiring one closes it
 * at once. Requests without the cookie pay nothing.
 */
export function reviewerLinkAccess(deps: AppDeps): RequestHandler {
  const now = clockOf(deps)
  return (req, res, next) => {
    const ids = openedLinkIds(req, deps.config.sessionSecrets)
    if (!ids.length) return next()
    return (async () => {
      const at = now()
      const links = await liveLinksAmong(requestEm(), ids, at)
      if (!links.length) return next()
      reviewing.set(req, { links, own: req.ability })
      // The dataset's own routes show its working state: only links made for that version open
      // them. A pinned link reads its frozen version through the versions routes.
      const current = links.filter((l) => !l.pinned)
      if (current.length)
        req.ability = defineAbilityFor(
          req.viewer,
          at,
          current.map((l) => l.dataset),
        )
      const download = DOWNLOAD_PATH.exec(req.path)
      const link = download && linkFor(current, download[1]!)
      if (link) auditUseOnSuccess(deps, req, res, link, download[2]!)
      next()
    })()
  }
}

function linkFor(links: Reviewing['links'], idOrAccession: string) {
  return links.find(
    (l) => String(l.dataset) === idOrAccession || l.accession === idOrAccession.toUpperCase(),
  )
}

function auditUseOnSuccess(
  deps: AppDeps,
  req: Request,
  res: Response,
  link: Reviewing['links'][number],
  what: string,
) {
  res.on('finish', () => {
    if (res.statusCode >= 300) return
    const em = deps.orm.em.fork()
    audit(em, req, {
      action: 'reviewer_link.use',
      targetType: 'Dataset',
      targetId: link.accession,
      details: { link: link.id, download: what, range: req.get('range') ?? null },
    })
    void em.flush().catch((error: unknown) => deps.logger.error({ err: error }, 'audit failed'))
  })
}

/** The datasets this request reaches through live reviewer links (for the client's abilities). */
export const reviewedDatasets = (req: Request): number[] =>
  reviewing.get(req)?.links.flatMap((l) => (l.pinned ? [] : [l.dataset])) ?? []

/**
 * The version a live reviewer link of this request opens on the dataset (the newest such link's),
 * or null without one.
 */
export function reviewedVersion(req: Request, datasetId: number): number | null {
  const links = reviewing.get(req)?.links.filter((l) => l.dataset === datasetId) ?? []
  return links.length ? Math.max(...links.map((l) => l.version)) : null
}

/** Audits a download of a frozen version's file made through a reviewer link, once it succeeds. */
export function auditReviewedDownload(
  deps: AppDeps,
  req: Request,
  res: Response,
  datasetId: number,
  what: string,
) {
  const link = reviewing.get(req)?.links.find((l) => l.dataset === datasetId)
  if (link) auditUseOnSuccess(deps, req, res, link, what)
}

/**
 * True when this request sees the dataset only through an anonymous reviewer link: depositor
 * names, affiliations, comments and audit actors are then left out of what it is sent.
 */
export function anonymousReview(req: Request, dataset: DatasetFacts): boolean {
  const state = reviewing.get(req)
  if (!state) return false
  const link = state.links.find((l) => l.dataset === dataset.id)
  return !!link?.anonymous && !state.own.can('preview', subjectOf(dataset))
}

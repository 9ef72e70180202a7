import type { EntityManager } from '@mikro-orm/better-sqlite'
import {
  REVIEWER_LINK_MAX_DAYS,
  type CreateReviewerLinkInput,
  type ReviewerLinkCreatedDto,
  type ReviewerLinkDto,
  type ReviewerLinkState,
} from '@shared/schemas/reviewer-link.schema'
import type { AppConfig } from '../../config'
import { ConflictError, NotFoundError, ValidationError } from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'
import { ReviewerLink, type IReviewerLink } from './reviewer-link.entity'
import {
  demoReviewerToken,
  hashReviewerToken,
  newReviewerToken,
  REVIEWER_TOKEN_PATTERN,
  reviewerUrl,
} from './reviewer-link-token'

const DAY_MS = 86_400_000

export function linkState(link: IReviewerLink, now: Date): ReviewerLinkState {
  if (link.revokedAt) return 'revoked'
  return link.expiresAt.getTime() > now.getTime() ? 'live' : 'expired'
}

function expiryOf(input: CreateReviewerLinkInput, now: Date): Date {
  const expiresAt = new Date(input.expiresAt)
  const latest = now.getTime() + REVIEWER_LINK_MAX_DAYS * DAY_MS
  const problem =
    expiresAt.getTime() <= now.getTime()
      ? 'The expiry must be in the future.'
      : expiresAt.getTime() > latest
        ? `A reviewer link may live at most ${REVIEWER_LINK_MAX_DAYS} days; choose an earlier expiry.`
        : null
  if (problem) throw new ValidationError([{ pointer: '/expiresAt', detail: problem }], problem)
  return expiresAt
}

/** Drafts are never shown to a journal: a link needs a submitted (or later) dataset. */
export function assertLinkable(dataset: IDataset): void {
  if (dataset.state === 'draft')
    throw new ConflictError(
      `${dataset.accession} is a draft. Reviewer links open submitted data only: submit it first.`,
    )
  if (dataset.state === 'withdrawn')
    throw new ConflictError(`${dataset.accession} was withdrawn; it cannot be reviewed any more.`)
}

interface LinkContext {
  config: Pick<AppConfig, 'publicUrl' | 'sessionSecrets' | 'demo'>
  now: Date
}

export async function createReviewerLink(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  input: CreateReviewerLinkInput,
  { config, now }: LinkContext,
  options: { demo?: boolean } = {},
): Promise<ReviewerLinkCreatedDto> {
  assertLinkable(dataset)
  const expiresAt = expiryOf(input, now)
  const token = options.demo
    ? demoReviewerToken(config.sessionSecrets[0]!, dataset.accession, input.anonymous)
    : newReviewerToken()
  const link = em.create(ReviewerLink, {
    dataset: dataset.id,
    version: dataset.version,
    tokenHash: hashReviewerToken(token),
    anonymous: input.anonymous,
    expiresAt,
    createdBy: actor.user?.id ?? null,
    createdAt: now,
    demo: options.demo ?? false,
  })
  await em.flush()
  audit(em, actor, {
    action: 'reviewer_link.create',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: {
      link: link.id,
      version: link.version,
      anonymous: link.anonymous,
      expiresAt: expiresAt.toISOString(),
    },
  })
  await em.flush()
  return {
    id: link.id,
    url: reviewerUrl(config.publicUrl, token),
    expiresAt: expiresAt.toISOString(),
    anonymous: link.anonymous,
  }
}

export async function listReviewerLinks(
  em: EntityManager,
  dataset: IDataset,
  { config, now }: LinkContext,
): Promise<ReviewerLinkDto[]> {
  const links = await em.find(
    ReviewerLink,
    { dataset: dataset.id },
    { orderBy: { createdAt: 'desc', id: 'desc' } },
  )
  const creators = links.map((l) => l.createdBy).filter((id): id is number => id != null)
  const users = creators.length ? await em.find(User, { id: { $in: creators } }) : []
  const names = new Map(users.map((u) => [u.id, u.name]))
  return links.map((l) => ({
    id: l.id,
    version: l.version,
    anonymous: l.anonymous,
    state: linkState(l, now),
    expiresAt: l.expiresAt.toISOString(),
    createdAt: l.createdAt.toISOString(),
    revokedAt: l.revokedAt?.toISOString() ?? null,
    createdBy: l.createdBy != null ? { id: l.createdBy, name: names.get(l.createdBy) ?? '' } : null,
    demoUrl:
      config.demo && l.demo && linkState(l, now) === 'live'
        ? reviewerUrl(
            config.publicUrl,
            demoReviewerToken(config.sessionSecrets[0]!, dataset.accession, l.anonymous),
          )
        : null,
  }))
}

export async function revokeReviewerLink(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  linkId: number,
  now: Date,
): Promise<void> {
  const link = await em.findOne(ReviewerLink, { id: linkId, dataset: dataset.id })
  if (!link) throw new NotFoundError('reviewer link', linkId)
  if (link.revokedAt) return
  link.revokedAt = now
  audit(em, actor, {
    action: 'reviewer_link.revoke',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: { link: link.id },
  })
  await em.flush()
}

/** Live links of a dataset, for the link check and the editors' page. */
export async function liveLinkCounts(
  em: EntityManager,
  datasetIds: number[],
  now: Date,
): Promise<Map<number, number>> {
  const counts = new Map<number, number>()
  if (!datasetIds.length) return counts
  const links = await em.find(
    ReviewerLink,
    { dataset: { $in: datasetIds }, revokedAt: null, expiresAt: { $gt: now } },
    { fields: ['dataset'], disableIdentityMap: true },
  )
  for (const l of links) counts.set(l.dataset, (counts.get(l.dataset) ?? 0) + 1)
  return counts
}

export type TokenVerdict =
  | { ok: true; link: IReviewerLink; dataset: IDataset }
  | { ok: false; reason: 'unknown' | 'expired' | 'revoked' | 'withdrawn' }

/** A live link a browser holds, with the version it opens. */
export interface LiveLink {
  id: number
  dataset: number
  accession: string
  anonymous: boolean
  /** The version the link was made for. */
  version: number
  /**
   * A later version has been opened since: the link then shows its own frozen version (the
   * versions API and landing page), not the dataset's working draft.
   */
  pinned: boolean
}

/** What a presented token is worth right now. A malformed token is simply unknown. */
export async function resolveReviewerToken(
  em: EntityManager,
  token: string,
  now: Date,
): Promise<TokenVerdict> {
  if (!REVIEWER_TOKEN_PATTERN.test(token)) return { ok: false, reason: 'unknown' }
  const link = await em.findOne(ReviewerLink, { tokenHash: hashReviewerToken(token) })
  if (!link) return { ok: false, reason: 'unknown' }
  const state = linkState(link, now)
  if (state !== 'live') return { ok: false, reason: state }
  const dataset = await em.findOne(Dataset, { id: link.dataset })
  if (!dataset) return { ok: false, reason: 'unknown' }
  // A draft of the linked version itself was sent back; a draft of a later version leaves the
  // linked (frozen) version open to review.
  if (
    dataset.state === 'withdrawn' ||
    (dataset.state === 'draft' && link.version >= dataset.version)
  )
    return { ok: false, reason: 'withdrawn' }
  return { ok: true, link, dataset }
}

/** The links among `ids` that still work at `now`, with their dataset's accession. */
export async function liveLinksAmong(
  em: EntityManager,
  ids: number[],
  now: Date,
): Promise<LiveLink[]> {
  if (!ids.length) return []
  const links = await em.find(
    ReviewerLink,
    { id: { $in: ids }, revokedAt: null, expiresAt: { $gt: now } },
    { disableIdentityMap: true },
  )
  if (!links.length) return []
  const datasets = await em.find(
    Dataset,
    { id: { $in: links.map((l) => l.dataset) } },
    { fields: ['accession', 'version'], disableIdentityMap: true },
  )
  const byId = new Map(datasets.map((d) => [d.id, d]))
  return links.flatMap((l) => {
    const dataset = byId.get(l.dataset)
    return dataset
      ? [
          {
            id: l.id,
            dataset: l.dataset,
            accession: dataset.accession,
            anonymous: l.anonymous,
            version: l.version,
            pinned: l.version < dataset.version,
          },
        ]
      : []
  })
}

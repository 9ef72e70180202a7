import { z } from 'zod'

/** The longest a reviewer link may live: a long review round, not a standing back door. */
export const REVIEWER_LINK_MAX_DAYS = 180

export const createReviewerLinkSchema = z
  .object({
    expiresAt: z.iso.datetime({
      offset: true,
      error: 'Give the expiry as a date and time, e.g. 2026-12-31T23:59:00Z',
    }),
    /** Hide depositor names, affiliations, comments and audit actors from whoever opens it. */
    anonymous: z.boolean().default(false),
  })
  .meta({ id: 'CreateReviewerLink' })
export type CreateReviewerLinkInput = z.infer<typeof createReviewerLinkSchema>

/** The answer to creating a link: the only time its secret URL is shown. */
export const reviewerLinkCreatedSchema = z
  .object({ id: z.number(), url: z.string(), expiresAt: z.string(), anonymous: z.boolean() })
  .meta({ id: 'ReviewerLinkCreated' })
export type ReviewerLinkCreatedDto = z.infer<typeof reviewerLinkCreatedSchema>

export const REVIEWER_LINK_STATES = ['live', 'expired', 'revoked'] as const
export type ReviewerLinkState = (typeof REVIEWER_LINK_STATES)[number]

/** A link as its dataset's page lists it: never with its token. */
export const reviewerLinkSchema = z
  .object({
    id: z.number(),
    version: z.number(),
    anonymous: z.boolean(),
    state: z.enum(REVIEWER_LINK_STATES),
    expiresAt: z.string(),
    createdAt: z.string(),
    revokedAt: z.string().nullable(),
    createdBy: z.object({ id: z.number(), name: z.string() }).nullable(),
    /** Demo mode only, for the links the demo seeded (their token is derived, not stored). */
    demoUrl: z.string().nullable(),
  })
  .meta({ id: 'ReviewerLink' })
export type ReviewerLinkDto = z.infer<typeof reviewerLinkSchema>

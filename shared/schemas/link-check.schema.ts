import { z } from 'zod'
import { ACCESS_PHASES } from '../domain/dataset-state'

/** Longest statement accepted, and most distinct items checked in one request. */
export const LINK_CHECK_MAX_CHARS = 20_000
export const LINK_CHECK_MAX_ITEMS = 100

export const linkCheckRequestSchema = z
  .object({
    text: z
      .string({ error: 'Paste the data availability statement or a list of links' })
      .trim()
      .min(1, 'Paste the data availability statement or a list of links')
      .max(
        LINK_CHECK_MAX_CHARS,
        `Paste at most ${LINK_CHECK_MAX_CHARS.toLocaleString('en')} characters at a time`,
      ),
  })
  .meta({ id: 'LinkCheckRequest' })

export const LINK_KINDS = ['accession', 'hub_url', 'doi', 'external_url'] as const
export type LinkKind = (typeof LINK_KINDS)[number]

export const LINK_KIND_LABELS: Record<LinkKind, string> = {
  accession: 'Accession',
  hub_url: 'Link to this hub',
  doi: 'DOI',
  external_url: 'Other link',
}

/** found: a dataset the caller may see; not_found: none they may see; unverifiable: not ours to check. */
export const LINK_VERDICTS = ['found', 'not_found', 'unverifiable'] as const
export type LinkVerdict = (typeof LINK_VERDICTS)[number]

export const linkCheckItemSchema = z.object({
  /** The text as it was written in the statement. */
  input: z.string(),
  kind: z.enum(LINK_KINDS),
  verdict: z.enum(LINK_VERDICTS),
  accession: z.string().nullable(),
  title: z.string().nullable(),
  /** The access phase (state, and for approved data whether its embargo has ended). */
  phase: z.enum(ACCESS_PHASES).nullable(),
  publicNow: z.boolean().nullable(),
  embargoUntil: z.string().nullable(),
  /** null: not shown to this caller (only owners and the manuscript's editors see it). */
  reviewerLink: z.boolean().nullable(),
  /** The details below need the preview right; null when the caller lacks it. */
  completeness: z
    .object({ score: z.number(), requiredFilled: z.number(), requiredTotal: z.number() })
    .nullable(),
  files: z.object({ total: z.number(), withChecksum: z.number() }).nullable(),
  qualityReports: z.object({ tables: z.number(), done: z.number() }).nullable(),
  note: z.string(),
})
export type LinkCheckItem = z.infer<typeof linkCheckItemSchema>

export const linkCheckResultSchema = z
  .object({ items: z.array(linkCheckItemSchema), checkedAt: z.string() })
  .meta({ id: 'LinkCheckResult' })
export type LinkCheckResult = z.infer<typeof linkCheckResultSchema>

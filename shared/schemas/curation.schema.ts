import { z } from 'zod'

/**
 * The steward's curation check and its record. Each step of a dataset's curation (submitted,
 * changes requested, approved, withdrawn) is one entry of the dataset's curation thread, with the
 * checklist as the steward saw it and the comment sent to the depositors.
 */

/** What the steward checks before approving, in the order the review dialog lists them. */
export const CURATION_CHECKS = ['completeness', 'quality', 'licence', 'ethics', 'embargo'] as const
export type CurationCheckKey = (typeof CURATION_CHECKS)[number]

export const CURATION_CHECK_LABELS: Record<CurationCheckKey, string> = {
  completeness: 'Required metadata complete',
  quality: 'Quality report read',
  licence: 'Licence suits the data',
  ethics: 'Ethics reference for human-derived samples',
  embargo: 'Embargo length within policy',
}

/** pass: fine; fail: blocks approval; not_applicable: nothing to check (no report, not human-derived). */
export const CHECK_OUTCOMES = ['pass', 'fail', 'not_applicable'] as const
export type CheckOutcome = (typeof CHECK_OUTCOMES)[number]

export const curationCheckSchema = z
  .object({
    key: z.enum(CURATION_CHECKS),
    label: z.string(),
    outcome: z.enum(CHECK_OUTCOMES),
    /** What Stipple found, in words (e.g. "3 required fields missing", "embargo 400 days, policy 365"). */
    detail: z.string(),
  })
  .meta({ id: 'CurationCheck' })
export type CurationCheckDto = z.infer<typeof curationCheckSchema>

/** The steward's own ticks, sent with an approval: every item must be confirmed. */
export const curationChecklistSchema = z
  .object(
    Object.fromEntries(CURATION_CHECKS.map((k) => [k, z.boolean().optional()])) as Record<
      CurationCheckKey,
      z.ZodOptional<z.ZodBoolean>
    >,
  )
  .meta({ id: 'CurationChecklist' })
export type CurationChecklist = z.infer<typeof curationChecklistSchema>

export const CURATION_STEPS = [
  'submitted',
  'changes_requested',
  'approved',
  'withdrawn',
  'revision_started',
] as const
export type CurationStep = (typeof CURATION_STEPS)[number]

export const CURATION_STEP_LABELS: Record<CurationStep, string> = {
  submitted: 'Submitted for curation',
  changes_requested: 'Changes requested',
  approved: 'Approved',
  withdrawn: 'Withdrawn',
  revision_started: 'New version started',
}

export const curationEntrySchema = z
  .object({
    id: z.number(),
    step: z.enum(CURATION_STEPS),
    /** The version this step concerns (the draft's number before approval). */
    version: z.number(),
    actorName: z.string().nullable(),
    comment: z.string(),
    /** The checks as they stood at the decision (empty for submissions). */
    checks: z.array(curationCheckSchema),
    /** What the steward ticked with the decision. */
    checklist: curationChecklistSchema,
    createdAt: z.string(),
  })
  .meta({ id: 'CurationEntry' })
export type CurationEntryDto = z.infer<typeof curationEntrySchema>

export const curationThreadSchema = z
  .object({
    entries: z.array(curationEntrySchema),
    /** The checks as they stand now, for the steward's next decision and the depositor's view. */
    checks: z.array(curationCheckSchema),
    /** Longest embargo the policy allows, in years from the decision. */
    embargoMaxYears: z.number(),
  })
  .meta({ id: 'CurationThread' })
export type CurationThreadDto = z.infer<typeof curationThreadSchema>

/** The steward's work queue on the home page. */
export const WORK_QUEUE_KINDS = [
  'awaiting_review',
  'changes_requested',
  'embargo_ending',
  'doi_failed',
] as const
export type WorkQueueKind = (typeof WORK_QUEUE_KINDS)[number]

export const workQueueItemSchema = z
  .object({
    kind: z.enum(WORK_QUEUE_KINDS),
    datasetId: z.number(),
    accession: z.string(),
    title: z.string(),
    /** Submitted at, changes requested at, embargo end, or the failed attempt (ISO 8601). */
    at: z.string().nullable(),
    /** For a failed DOI: the version number and the last error. */
    version: z.number().nullable(),
    detail: z.string().nullable(),
  })
  .meta({ id: 'WorkQueueItem' })
export type WorkQueueItemDto = z.infer<typeof workQueueItemSchema>

export const workQueueSchema = z
  .object({
    awaitingReview: z.array(workQueueItemSchema),
    changesRequested: z.array(workQueueItemSchema),
    embargoEnding: z.array(workQueueItemSchema),
    doiFailed: z.array(workQueueItemSchema),
  })
  .meta({ id: 'StewardWorkQueue' })
export type WorkQueueDto = z.infer<typeof workQueueSchema>

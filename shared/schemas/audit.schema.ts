import { z } from 'zod'
import { pageQuerySchema } from './common.schema'

/** The filters a steward combines on the audit log; the CSV export takes the same ones. */
export const auditFilterSchema = z.object({
  targetType: z.string().max(40).optional(),
  targetId: z.string().max(60).optional(),
  /** A dataset's accession: its events, whatever their kind, and those of its frozen versions. */
  accession: z.string().trim().max(40).optional(),
  /** Part of the acting person's name or e-mail, or "system" for the scheduler and the CLI. */
  actor: z.string().trim().max(120).optional(),
  action: z.string().max(60).optional(),
  /** Events at or after this instant (ISO date or date-time, UTC when no zone is given). */
  from: z.iso.datetime({ offset: true }).or(z.iso.date()).optional(),
  /** Events before this instant; a date alone means up to the end of that day. */
  to: z.iso.datetime({ offset: true }).or(z.iso.date()).optional(),
})
export type AuditFilter = z.infer<typeof auditFilterSchema>

export const auditQuerySchema = pageQuerySchema.extend(auditFilterSchema.shape)

/** One audit log entry, as GET /api/audit returns it. */
export const auditEventSchema = z
  .object({
    id: z.number(),
    /** The acting user's id, or null for the system and operator commands. */
    actor: z.number().nullable(),
    /** The acting user's name (their e-mail when they have none), or null for the system. */
    actorName: z.string().nullable(),
    action: z.string(),
    /** The action in words. */
    actionLabel: z.string(),
    targetType: z.string(),
    targetId: z.string(),
    /** What was acted on, as people name it: an accession, a person, a token's name. */
    targetLabel: z.string(),
    /** The accession of the dataset the target is or belongs to (a version), else null. */
    targetDataset: z.string().nullable(),
    time: z.string(),
    address: z.string().nullable(),
    details: z.record(z.string(), z.unknown()).nullable(),
    /** The details in words. */
    summary: z.string(),
  })
  .meta({ id: 'AuditEvent' })
export type AuditEventDto = z.infer<typeof auditEventSchema>

/** A message the demo mail catcher received (GET /api/dev/mail). */
export const caughtMailSchema = z
  .object({
    id: z.number(),
    to: z.array(z.string()),
    from: z.string(),
    subject: z.string(),
    text: z.string(),
    receivedAt: z.string(),
  })
  .meta({ id: 'CaughtMail' })
export type CaughtMailDto = z.infer<typeof caughtMailSchema>

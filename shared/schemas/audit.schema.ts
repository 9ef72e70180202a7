import { z } from 'zod'
import { pageQuerySchema } from './common.schema'

export const auditQuerySchema = pageQuerySchema.extend({
  targetType: z.string().max(40).optional(),
  targetId: z.string().max(60).optional(),
  action: z.string().max(60).optional(),
})

/** One audit log entry, as GET /api/audit returns it. */
export const auditEventSchema = z
  .object({
    id: z.number(),
    /** The acting user's id, or null for the system and operator commands. */
    actor: z.number().nullable(),
    action: z.string(),
    targetType: z.string(),
    targetId: z.string(),
    time: z.string(),
    address: z.string().nullable(),
    details: z.record(z.string(), z.unknown()).nullable(),
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

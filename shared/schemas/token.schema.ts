import { z } from 'zod'
import { textField } from './common.schema'

export const createTokenSchema = z
  .object({
    name: textField('Name', 100),
    expiresInDays: z.number().int().min(1).max(3650).nullable().default(365),
  })
  .meta({ id: 'CreateToken' })
export type CreateTokenInput = z.input<typeof createTokenSchema>
export type CreateTokenBody = z.output<typeof createTokenSchema>

export const tokenSchema = z
  .object({
    id: z.number(),
    name: z.string(),
    prefix: z.string(),
    createdAt: z.string(),
    lastUsedAt: z.string().nullable(),
    expiresAt: z.string().nullable(),
  })
  .meta({ id: 'ApiToken' })
export type TokenDto = z.infer<typeof tokenSchema>

/** Returned once, at creation: the only time the secret is ever shown. */
export const createdTokenSchema = tokenSchema
  .extend({ token: z.string() })
  .meta({ id: 'CreatedToken' })
export type CreatedTokenDto = z.infer<typeof createdTokenSchema>

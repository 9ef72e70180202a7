import type { Request } from 'express'
import type { z } from 'zod'
import type { FieldError } from '@shared/api/problem'
import { ValidationError } from '../errors/http-error'

export function zodFieldErrors(error: z.ZodError): FieldError[] {
  return error.issues.map((issue) => ({
    pointer: `#/${issue.path.map(String).join('/')}`,
    detail: issue.message,
  }))
}

function parseWith<T extends z.ZodType>(schema: T, value: unknown, where: string): z.output<T> {
  const result = schema.safeParse(value)
  if (!result.success) {
    throw new ValidationError(
      zodFieldErrors(result.error),
      `The ${where} has missing or invalid fields.`,
    )
  }
  return result.data
}

/** Handlers read input only through these, so every body and query is checked by a shared schema. */
export const parseBody = <T extends z.ZodType>(schema: T, req: Request) =>
  parseWith(schema, req.body ?? {}, 'request body')
export const parseQuery = <T extends z.ZodType>(schema: T, req: Request) =>
  parseWith(schema, req.query, 'query string')
export const parseParams = <T extends z.ZodType>(schema: T, req: Request) =>
  parseWith(schema, req.params, 'path')

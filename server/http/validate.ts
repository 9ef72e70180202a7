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

/**
 * The JSON pointer of the first string holding a NUL character, if any. SQLite and most tools end
 * text at NUL, so such input is refused before it reaches a query or a file name.
 */
export function nulBytePointer(value: unknown, path = '#'): string | null {
  if (typeof value === 'string') return value.includes('\u0000') ? path : null
  if (typeof value !== 'object' || value === null) return null
  for (const [key, item] of Object.entries(value)) {
    const at = `${path}/${key}`
    if (key.includes('\u0000')) return at
    const found = nulBytePointer(item, at)
    if (found) return found
  }
  return null
}

function parseWith<T extends z.ZodType>(schema: T, value: unknown, where: string): z.output<T> {
  const nul = nulBytePointer(value)
  if (nul)
    throw new ValidationError(
      [{ pointer: nul, detail: 'Text may not contain the NUL character (U+0000).' }],
      `The ${where} contains a NUL character.`,
    )
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

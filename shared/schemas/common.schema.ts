import { z } from 'zod'

/** A positive integer id taken from a path or query string. */
export const idSchema = z.coerce.number().int().positive()

export const emailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'Enter a valid e-mail address' }))

/** Trimmed text with a clear message when it is empty or too long. */
export function textField(label: string, max: number, min = 1) {
  return z
    .string({ error: `${label} is required` })
    .trim()
    .min(min, min === 1 ? `${label} is required` : `${label} needs at least ${min} characters`)
    .max(max, `${label} can have at most ${max} characters`)
}

/** Paging shared by every list route: `?limit=&offset=`. */
export const pageQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(200).default(25),
  offset: z.coerce.number().int().min(0).default(0),
})

export interface Page<T> {
  items: T[]
  total: number
}

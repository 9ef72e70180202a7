import { z } from 'zod'

/** Positive, finite numbers within a plausible range, with messages that name the range and unit. */
export function quantity(
  label: string,
  unit: string,
  min: number,
  max: number,
  options: { exclusiveMin?: boolean; int?: boolean } = {},
) {
  let schema = z
    .number({ error: `${label} must be a number (${unit})` })
    .refine(Number.isFinite, `${label} must be a finite number`)
  schema = options.exclusiveMin
    ? schema.refine((v) => v > min, `${label} must be more than ${min} ${unit}`)
    : schema.refine((v) => v >= min, `${label} cannot be less than ${min} ${unit}`)
  schema = schema.refine((v) => v <= max, `${label} above ${max} ${unit} is not plausible`)
  if (options.int) schema = schema.refine(Number.isInteger, `${label} must be a whole number`)
  return schema
}

export const text = (label: string, max = 500) =>
  z
    .string()
    .trim()
    .min(1, `${label} cannot be empty`)
    .max(max, `${label} can have at most ${max} characters`)

/** Visible light to near infrared, where fluorophores excite and emit. */
export const wavelengthNm = (label: string) => quantity(label, 'nm', 200, 2000)

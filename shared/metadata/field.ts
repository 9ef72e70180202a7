import type { z } from 'zod'

/** How much a field matters for reuse: submitting needs every required one. */
export const TIERS = ['required', 'recommended', 'optional'] as const
export type Tier = (typeof TIERS)[number]

/** Units a quantity can carry; every quantity in the schema names one. */
export type Unit =
  | 'nm'
  | 'µm'
  | 'ms'
  | 's'
  | 'mW'
  | 'W/cm²'
  | '°C'
  | 'e⁻/ADU'
  | 'ADU'
  | 'e⁻'
  | '×'
  | 'frames'
  | 'fraction'

export interface FieldInfo {
  tier: Tier
  label: string
  help?: string
  unit?: Unit
  /** The OME data model element/attribute or REMBI term the field corresponds to. */
  term?: string
  /** The form offers values already used in the same project (structures, probes, instruments). */
  suggest?: boolean
  /** Render as a multi-line text box. */
  multiline?: boolean
}

/**
 * A metadata field: the value schema, made optional (drafts may be incomplete) and annotated with
 * its tier, label, unit and vocabulary term. The annotations travel into the JSON Schema that
 * GET /api/vocabulary serves, as `title`, `description` and `x-…` keywords.
 */
export function field<T extends z.ZodType>(schema: T, info: FieldInfo) {
  return schema.optional().meta({
    title: info.label,
    ...(info.help ? { description: info.help } : {}),
    'x-tier': info.tier,
    ...(info.unit ? { 'x-unit': info.unit } : {}),
    ...(info.term ? { 'x-term': info.term } : {}),
    ...(info.suggest ? { 'x-suggest': true } : {}),
    ...(info.multiline ? { 'x-multiline': true } : {}),
  })
}

/** A section or a repeated group: a title, and (for groups) the tier of having at least one. */
export function group<T extends z.ZodType>(schema: T, info: Omit<FieldInfo, 'unit'>) {
  return field(schema, info)
}

import { z } from 'zod'
import { metadataObjectSchema } from './metadata.schema'

/** The metadata schema as JSON Schema (2020-12) with our `x-tier`, `x-unit`, `x-term` keywords. */
export function metadataJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(metadataObjectSchema, { io: 'input', unrepresentable: 'any' }) as Record<
    string,
    unknown
  >
}

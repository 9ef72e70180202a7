import { z } from 'zod'
import { instrumentSchema } from '../metadata/instrument.schema'

export const instrumentProfileNameSchema = z.string().trim().min(2, 'Name the instrument').max(120)

/** Body of POST /api/instrument-profiles: a lab's instrument, saved for reuse. */
export const instrumentProfileInputSchema = z
  .object({ name: instrumentProfileNameSchema, instrument: instrumentSchema })
  .meta({ id: 'InstrumentProfileInput' })

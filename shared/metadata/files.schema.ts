import { z } from 'zod'
import { field, group } from './field'
import { quantity, text } from './quantities'

export const columnDescriptionSchema = z.object({
  name: field(text('Column', 100), { tier: 'required', label: 'Column' }),
  meaning: field(text('Meaning', 300), { tier: 'required', label: 'Meaning' }),
  unit: field(text('Unit', 30), { tier: 'required', label: 'Unit' }),
})

/** What each deposited file is: table columns with meaning and unit, or raw-stack geometry. */
export const fileDescriptionSchema = z.object({
  name: field(text('File', 255), { tier: 'required', label: 'File name' }),
  kind: field(z.enum(['localization table', 'raw stack', 'other']), {
    tier: 'required',
    label: 'Kind',
  }),
  description: field(text('Description', 1000), {
    tier: 'optional',
    label: 'Description',
    multiline: true,
  }),
  columns: group(z.array(columnDescriptionSchema).max(200), { tier: 'optional', label: 'Columns' }),
  pixelSizeNm: field(quantity('Pixel size', 'nm', 0, 10_000, { exclusiveMin: true }), {
    tier: 'optional',
    label: 'Pixel size at the sample',
    unit: 'nm',
  }),
  frameIntervalMs: field(quantity('Frame interval', 'ms', 0, 1e7, { exclusiveMin: true }), {
    tier: 'optional',
    label: 'Frame interval',
    unit: 'ms',
  }),
})

export const filesSchema = z.array(fileDescriptionSchema).max(1000)
export type FileDescription = z.infer<typeof fileDescriptionSchema>

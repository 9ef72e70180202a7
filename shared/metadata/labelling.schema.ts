import { z } from 'zod'
import { field } from './field'
import { quantity, text } from './quantities'

export const PROBE_CLASSES = [
  'organic dye',
  'fluorescent protein',
  'photoactivatable or photoconvertible protein',
  'DNA-PAINT imager',
  'quantum dot',
  'other',
] as const
export const LABELLING_STRATEGIES = [
  'primary and secondary antibody',
  'primary antibody',
  'nanobody',
  'fluorescent protein fusion',
  'self-labelling enzyme tag',
  'DNA-PAINT docking strand',
  'small-molecule or click label',
  'other',
] as const

export const labelSchema = z.object({
  target: field(text('Target', 200), {
    tier: 'required',
    label: 'Target',
    help: 'The molecule labelled, e.g. Nup96',
    suggest: true,
  }),
  probeClass: field(z.enum(PROBE_CLASSES), { tier: 'required', label: 'Probe class' }),
  label: field(text('Label', 200), {
    tier: 'required',
    label: 'Label (fluorophore)',
    help: 'Generic name of the fluorophore or imager strand',
    suggest: true,
  }),
  strategy: field(z.enum(LABELLING_STRATEGIES), { tier: 'required', label: 'Labelling strategy' }),
  linkageErrorNm: field(quantity('Linkage error', 'nm', 0, 200), {
    tier: 'recommended',
    label: 'Estimated linkage error',
    unit: 'nm',
    help: 'Label-to-target distance; primary + secondary IgG ≈ 15–25 nm, nanobody ≈ 2–4 nm',
  }),
  channel: field(text('Channel', 50), { tier: 'optional', label: 'Channel name' }),
})
export type LabelMetadata = z.infer<typeof labelSchema>

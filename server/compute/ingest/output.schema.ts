/** The Arrow schema of the output: one field per slot, typed by its output kind. */
import { Field, Float32, Float64, Schema, Uint16, Uint32, Uint8, type DataType } from 'apache-arrow'
import type { OutputKind } from './output.columns'
import type { ParsePlan, SlotSpec } from './parse-plan'

const ARROW_TYPES: Record<OutputKind, () => DataType> = {
  float32: () => new Float32(),
  float64: () => new Float64(),
  uint32: () => new Uint32(),
  uint16: () => new Uint16(),
  uint8: () => new Uint8(),
}

/** Fields carry the role, the unit of the stored values and the source column's name. */
export function outputSchema(plan: ParsePlan, kinds: OutputKind[], metadata: Map<string, string>) {
  return new Schema(
    plan.slots.map((slot, s) => fieldOf(slot, kinds[s] ?? slot.storage)),
    metadata,
  )
}

function fieldOf(slot: SlotSpec, kind: OutputKind) {
  const meta = new Map([
    ['role', slot.role],
    ['source_column', slot.sourceName],
  ])
  if (slot.storedUnit) meta.set('unit', slot.storedUnit)
  // A FWHM stored as sigma keeps a trace of what the table gave.
  if (slot.mappedRole !== slot.role) meta.set('source_role', slot.mappedRole)
  return new Field(slot.name, ARROW_TYPES[kind](), false, meta)
}

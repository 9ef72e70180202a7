/**
 * The output columns' storage kinds (the Arrow side is in output.schema.ts, kept apart so worker
 * threads need not load Arrow). A channel column whose values all fit in a byte is stored as
 * Uint8; the others keep the type they were parsed into (parse-plan.ts says why Float32 is enough
 * for positions).
 */
import type { OutputKind } from '../store/store-columns'
import type { ColumnStats } from './chunk.processor'
import type { ParsePlan } from './parse-plan'

export { BYTES_PER_VALUE, viewOf, type OutputArray, type OutputKind } from '../store/store-columns'

export function outputKinds(plan: ParsePlan, stats: ColumnStats[]): OutputKind[] {
  return plan.slots.map((slot, s) =>
    slot.storage === 'uint16' && (stats[s]?.max ?? 0) <= 255 ? 'uint8' : slot.storage,
  )
}

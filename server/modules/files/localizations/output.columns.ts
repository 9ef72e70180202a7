/**
 * The output columns: their storage kinds and typed-array views (the Arrow side is in
 * output.schema.ts, kept apart so worker threads need not load Arrow). A channel column
 * whose values all fit in a byte is stored as Uint8; the others keep the type they were parsed
 * into (parse-plan.ts says why Float32 is enough for positions).
 */
import type { ColumnStats } from './chunk.processor'
import type { ParsePlan } from './parse-plan'

export type OutputKind = 'float32' | 'float64' | 'uint32' | 'uint16' | 'uint8'
export type OutputArray = Float32Array | Float64Array | Uint32Array | Uint16Array | Uint8Array

export const BYTES_PER_VALUE: Record<OutputKind, number> = {
  float32: 4,
  float64: 8,
  uint32: 4,
  uint16: 2,
  uint8: 1,
}

export function outputKinds(plan: ParsePlan, stats: ColumnStats[]): OutputKind[] {
  return plan.slots.map((slot, s) =>
    slot.storage === 'uint16' && (stats[s]?.max ?? 0) <= 255 ? 'uint8' : slot.storage,
  )
}

export function viewOf(kind: OutputKind, buffer: ArrayBufferLike, length: number): OutputArray {
  if (kind === 'float32') return new Float32Array(buffer, 0, length)
  if (kind === 'float64') return new Float64Array(buffer, 0, length)
  if (kind === 'uint32') return new Uint32Array(buffer, 0, length)
  return kind === 'uint16' ? new Uint16Array(buffer, 0, length) : new Uint8Array(buffer, 0, length)
}

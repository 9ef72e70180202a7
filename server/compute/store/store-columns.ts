/**
 * The store's column kinds and their typed-array views. Kept free of Arrow so worker threads
 * that only parse or read need not load it.
 */
export type OutputKind = 'float32' | 'float64' | 'uint32' | 'uint16' | 'uint8'
export type OutputArray = Float32Array | Float64Array | Uint32Array | Uint16Array | Uint8Array

export const BYTES_PER_VALUE: Record<OutputKind, number> = {
  float32: 4,
  float64: 8,
  uint32: 4,
  uint16: 2,
  uint8: 1,
}

export function viewOf(kind: OutputKind, buffer: ArrayBufferLike, length: number): OutputArray {
  if (kind === 'float32') return new Float32Array(buffer, 0, length)
  if (kind === 'float64') return new Float64Array(buffer, 0, length)
  if (kind === 'uint32') return new Uint32Array(buffer, 0, length)
  return kind === 'uint16' ? new Uint16Array(buffer, 0, length) : new Uint8Array(buffer, 0, length)
}

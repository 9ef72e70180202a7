/**
 * Rows laid out by frame: a counting sort of every burst's frames. Bursts come sorted by first
 * frame, so the write cursors of neighbouring frames advance together and the writes stay close in
 * memory; each emitter's true position is read once per burst and copied into the position columns.
 */
import type { Bursts } from './blinking'
import type { EmitterPositions } from './emitters'

export interface FrameOrder {
  rowBurst: Uint32Array
  rowEmitter: Uint32Array
  frame: Uint32Array
  /** True emitter positions of every row; the caller adds drift and error in place. */
  x: Float64Array
  y: Float64Array
  z: Float64Array | null
}

function frameOffsets(bursts: Bursts, frames: number): Float64Array {
  const offsets = new Float64Array(frames + 1)
  for (let b = 0; b < bursts.count; b++) {
    const first = bursts.firstFrame[b] ?? 0
    const last = first + (bursts.frames[b] ?? 0)
    for (let f = first; f < last; f++) offsets[f + 1] = (offsets[f + 1] ?? 0) + 1
  }
  for (let f = 0; f < frames; f++) offsets[f + 1] = (offsets[f + 1] ?? 0) + (offsets[f] ?? 0)
  return offsets
}

/** Within a frame, rows follow the bursts' order. */
export function orderRows(bursts: Bursts, frames: number, emitters: EmitterPositions): FrameOrder {
  const offsets = frameOffsets(bursts, frames)
  const count = offsets[frames] ?? 0
  const order: FrameOrder = {
    rowBurst: new Uint32Array(count),
    rowEmitter: new Uint32Array(count),
    frame: new Uint32Array(count),
    x: new Float64Array(count),
    y: new Float64Array(count),
    z: emitters.z ? new Float64Array(count) : null,
  }
  const { rowBurst, rowEmitter, frame, x, y, z } = order
  for (let b = 0; b < bursts.count; b++) {
    const first = bursts.firstFrame[b] ?? 0
    const last = first + (bursts.frames[b] ?? 0)
    const e = bursts.emitter[b] ?? 0
    const ex = emitters.x[e] ?? 0
    const ey = emitters.y[e] ?? 0
    const ez = emitters.z ? (emitters.z[e] ?? 0) : 0
    for (let f = first; f < last; f++) {
      const row = offsets[f] ?? 0
      offsets[f] = row + 1
      rowBurst[row] = b
      rowEmitter[row] = e
      frame[row] = f
      x[row] = ex
      y[row] = ey
      if (z) z[row] = ez
    }
  }
  return order
}

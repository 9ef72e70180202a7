/**
 * Column loops written once per typed-array class. A loop that sees several classes makes V8's
 * element accesses polymorphic, several times slower over millions of rows (measured with the
 * ingest benchmark), so each class gets its own copy and a small dispatcher picks one.
 */
import type { StoredArray } from './stored-array'

export interface ColumnStats {
  /** Values that are numbers (not NaN). */
  count: number
  missing: number
  min: number
  max: number
}

/** min, max and NaN count, carried from chunk to chunk. */
export type Tally = Float64Array

export const newTally = (): Tally => Float64Array.of(Infinity, -Infinity, 0)

export function tallyStats(tally: Tally, values: number): ColumnStats {
  return { count: values - tally[2]!, missing: tally[2]!, min: tally[0]!, max: tally[1]! }
}

/** An array of the same class and length, zeroed. */
export function emptyLike(values: StoredArray): StoredArray {
  if (values instanceof Float32Array) return new Float32Array(values.length)
  if (values instanceof Float64Array) return new Float64Array(values.length)
  if (values instanceof Uint32Array) return new Uint32Array(values.length)
  return new Uint16Array(values.length)
}

/** Statistics of a Float32 (x, y) or Uint16 (channel) column, without moving it. */
export function statsOf(values: StoredArray): ColumnStats {
  const tally = newTally()
  if (values instanceof Float32Array) tallyFloat32(values, tally)
  else if (values instanceof Uint16Array) tallyUint16(values, tally)
  else throw new Error(`statsOf: no loop for ${values.constructor.name}`)
  return tallyStats(tally, values.length)
}

function tallyFloat32(values: Float32Array, tally: Tally) {
  let min = tally[0]!
  let max = tally[1]!
  let missing = tally[2]!
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
    if (v !== v) missing++
  }
  tally.set([min, max, missing])
}

function tallyUint16(values: Uint16Array, tally: Tally) {
  let min = tally[0]!
  let max = tally[1]!
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
  }
  tally.set([min, max, 0])
}

/**
 * Moves row i of `values` to `target[cursor[keys[i]]++]` (the second pass of a counting sort)
 * and tallies min, max and NaNs on the way. With `ranges`, also the min and max per tile (2
 * entries per tile), for x and y.
 */
export function scatterInto(
  values: StoredArray,
  target: StoredArray,
  keys: Uint16Array,
  cursor: Uint32Array,
  tally: Tally,
  ranges: Float64Array | null,
) {
  if (values instanceof Float32Array && target instanceof Float32Array) {
    if (ranges) scatterRanged(values, target, keys, cursor, tally, ranges)
    else scatterFloat32(values, target, keys, cursor, tally)
  } else if (values instanceof Float64Array && target instanceof Float64Array) {
    scatterFloat64(values, target, keys, cursor, tally)
  } else if (values instanceof Uint32Array && target instanceof Uint32Array) {
    scatterUint32(values, target, keys, cursor, tally)
  } else if (values instanceof Uint16Array && target instanceof Uint16Array) {
    scatterUint16(values, target, keys, cursor, tally)
  } else throw new Error('scatterInto: the target type does not fit the column')
}

function scatterFloat32(
  from: Float32Array,
  to: Float32Array,
  keys: Uint16Array,
  cursor: Uint32Array,
  tally: Tally,
) {
  let min = tally[0]!
  let max = tally[1]!
  let missing = tally[2]!
  for (let i = 0; i < from.length; i++) {
    const v = from[i]!
    to[cursor[keys[i]!]!++] = v
    if (v < min) min = v
    if (v > max) max = v
    if (v !== v) missing++
  }
  tally.set([min, max, missing])
}

function scatterFloat64(
  from: Float64Array,
  to: Float64Array,
  keys: Uint16Array,
  cursor: Uint32Array,
  tally: Tally,
) {
  let min = tally[0]!
  let max = tally[1]!
  let missing = tally[2]!
  for (let i = 0; i < from.length; i++) {
    const v = from[i]!
    to[cursor[keys[i]!]!++] = v
    if (v < min) min = v
    if (v > max) max = v
    if (v !== v) missing++
  }
  tally.set([min, max, missing])
}

function scatterUint32(
  from: Uint32Array,
  to: Uint32Array,
  keys: Uint16Array,
  cursor: Uint32Array,
  tally: Tally,
) {
  let min = tally[0]!
  let max = tally[1]!
  for (let i = 0; i < from.length; i++) {
    const v = from[i]!
    to[cursor[keys[i]!]!++] = v
    if (v < min) min = v
    if (v > max) max = v
  }
  tally.set([min, max, 0])
}

function scatterUint16(
  from: Uint16Array,
  to: Uint16Array,
  keys: Uint16Array,
  cursor: Uint32Array,
  tally: Tally,
) {
  let min = tally[0]!
  let max = tally[1]!
  for (let i = 0; i < from.length; i++) {
    const v = from[i]!
    to[cursor[keys[i]!]!++] = v
    if (v < min) min = v
    if (v > max) max = v
  }
  tally.set([min, max, 0])
}

/** x or y: also the range of each tile's values (x and y are never NaN). */
function scatterRanged(
  from: Float32Array,
  to: Float32Array,
  keys: Uint16Array,
  cursor: Uint32Array,
  tally: Tally,
  ranges: Float64Array,
) {
  for (let i = 0; i < from.length; i++) {
    const v = from[i]!
    const k = keys[i]!
    to[cursor[k]!++] = v
    if (v < ranges[2 * k]!) ranges[2 * k] = v
    if (v > ranges[2 * k + 1]!) ranges[2 * k + 1] = v
  }
  let min = tally[0]!
  let max = tally[1]!
  for (let k = 0; k < ranges.length; k += 2) {
    if (ranges[k]! < min) min = ranges[k]!
    if (ranges[k + 1]! > max) max = ranges[k + 1]!
  }
  tally.set([min, max, 0])
}

/**
 * Column loops written once per typed-array class. A loop that sees several classes makes V8's
 * element accesses polymorphic, several times slower over millions of rows (measured in the
 * ingest benchmark), so each class gets its own copy and `statsOf` / `scatter` pick one.
 */
import type { StoredArray } from './slot.columns'

export interface ColumnStats {
  /** Values that are numbers (not NaN). */
  count: number
  missing: number
  min: number
  max: number
}

export function statsOf(values: StoredArray): ColumnStats {
  if (values instanceof Float32Array) return floatStats32(values)
  if (values instanceof Float64Array) return floatStats64(values)
  return values instanceof Uint32Array ? intStats32(values) : intStats16(values)
}

function floatStats32(values: Float32Array): ColumnStats {
  let min = Infinity
  let max = -Infinity
  let missing = 0
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
    if (v !== v) missing++
  }
  return { count: values.length - missing, missing, min, max }
}

function floatStats64(values: Float64Array): ColumnStats {
  let min = Infinity
  let max = -Infinity
  let missing = 0
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
    if (v !== v) missing++
  }
  return { count: values.length - missing, missing, min, max }
}

function intStats32(values: Uint32Array): ColumnStats {
  let min = Infinity
  let max = -Infinity
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
  }
  return { count: values.length, missing: 0, min, max }
}

function intStats16(values: Uint16Array): ColumnStats {
  let min = Infinity
  let max = -Infinity
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
  }
  return { count: values.length, missing: 0, min, max }
}

/** A copy of `values` with row i moved to `cursor[keys[i]]++` (a counting sort's second pass). */
export function scatter(
  values: StoredArray,
  keys: Uint16Array,
  tileStarts: Uint32Array,
): StoredArray {
  const cursor = tileStarts.slice(0, -1)
  if (values instanceof Float32Array)
    return scatter32(values, new Float32Array(values.length), keys, cursor)
  if (values instanceof Float64Array)
    return scatter64(values, new Float64Array(values.length), keys, cursor)
  if (values instanceof Uint32Array)
    return scatterU32(values, new Uint32Array(values.length), keys, cursor)
  return scatterU16(values, new Uint16Array(values.length), keys, cursor)
}

function scatter32(
  from: Float32Array<ArrayBuffer>,
  to: Float32Array<ArrayBuffer>,
  keys: Uint16Array,
  cursor: Uint32Array,
) {
  for (let i = 0; i < from.length; i++) to[cursor[keys[i]!]!++] = from[i]!
  return to
}

function scatter64(
  from: Float64Array<ArrayBuffer>,
  to: Float64Array<ArrayBuffer>,
  keys: Uint16Array,
  cursor: Uint32Array,
) {
  for (let i = 0; i < from.length; i++) to[cursor[keys[i]!]!++] = from[i]!
  return to
}

function scatterU32(
  from: Uint32Array<ArrayBuffer>,
  to: Uint32Array<ArrayBuffer>,
  keys: Uint16Array,
  cursor: Uint32Array,
) {
  for (let i = 0; i < from.length; i++) to[cursor[keys[i]!]!++] = from[i]!
  return to
}

function scatterU16(
  from: Uint16Array<ArrayBuffer>,
  to: Uint16Array<ArrayBuffer>,
  keys: Uint16Array,
  cursor: Uint32Array,
) {
  for (let i = 0; i < from.length; i++) to[cursor[keys[i]!]!++] = from[i]!
  return to
}

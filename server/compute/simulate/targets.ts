/** The arrays a structure writes its target sites into. */

/** Where one structure writes its sites: rows start … start + count − 1 of x, y (and z). */
export interface StructureTargets {
  x: Float64Array
  y: Float64Array
  z: Float64Array | null
  zRange: [number, number] | null
  fieldNm: number
  start: number
  count: number
}

/** Index of the first entry of an ascending array greater than `value` (the last if none). */
export function firstAbove(cumulative: Float64Array, value: number): number {
  let low = 0
  let high = cumulative.length - 1
  while (low < high) {
    const middle = (low + high) >>> 1
    if ((cumulative[middle] ?? 0) > value) high = middle
    else low = middle + 1
  }
  return low
}

interface Sizes {
  dimensionOrder: string
  sizeZ: number
  sizeC: number
  sizeT: number
}

interface Position {
  firstZ: number
  firstC: number
  firstT: number
}

/**
 * The linear plane index of (Z, C, T) in the image's DimensionOrder, whose letters after "XY" run
 * from fastest to slowest (OME 2016-06: XYZCT means Z varies fastest, then C, then T).
 */
export function planeIndex(sizes: Sizes, at: Position): number {
  const size = { Z: sizes.sizeZ, C: sizes.sizeC, T: sizes.sizeT }
  const coordinate = { Z: at.firstZ, C: at.firstC, T: at.firstT }
  let index = 0
  let stride = 1
  for (const letter of sizes.dimensionOrder.slice(2)) {
    if (letter !== 'Z' && letter !== 'C' && letter !== 'T') continue
    index += coordinate[letter] * stride
    stride *= size[letter]
  }
  return index
}

/**
 * Points sorted into square cells (a counting sort), with their coordinates copied in cell order
 * so that a neighbourhood search reads memory in runs. Cells of about eps make a DBSCAN
 * neighbourhood the 3 × 3 cells around a point; the nearest-neighbour search grows rings of cells.
 */
export interface CellGrid {
  cell: number
  columns: number
  rows: number
  x0: number
  y0: number
  /** Point number of each sorted position. */
  order: Uint32Array
  xs: Float64Array
  ys: Float64Array
  /** Sorted positions of cell c: start[c] … start[c + 1] − 1. */
  start: Uint32Array
}

/** At most this many cells (the offsets take 4 bytes each). */
const MAX_CELLS = 1 << 22

export function cellGrid(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  count: number,
  wantedCell: number,
): CellGrid {
  let xMin = Infinity
  let xMax = -Infinity
  let yMin = Infinity
  let yMax = -Infinity
  for (let i = 0; i < count; i++) {
    xMin = Math.min(xMin, x[i]!)
    xMax = Math.max(xMax, x[i]!)
    yMin = Math.min(yMin, y[i]!)
    yMax = Math.max(yMax, y[i]!)
  }
  if (count === 0) xMin = xMax = yMin = yMax = 0
  let cell = wantedCell > 0 ? wantedCell : 1
  const across = (c: number) =>
    (Math.floor((xMax - xMin) / c) + 1) * (Math.floor((yMax - yMin) / c) + 1)
  while (across(cell) > MAX_CELLS) cell *= 1.5
  const columns = Math.floor((xMax - xMin) / cell) + 1
  const rows = Math.floor((yMax - yMin) / cell) + 1
  const cellOf = new Uint32Array(count)
  const start = new Uint32Array(columns * rows + 1)
  for (let i = 0; i < count; i++) {
    const c = Math.floor((y[i]! - yMin) / cell) * columns + Math.floor((x[i]! - xMin) / cell)
    cellOf[i] = c
    start[c + 1]!++
  }
  for (let c = 0; c < columns * rows; c++) start[c + 1]! += start[c]!
  const fill = start.slice(0, columns * rows)
  const order = new Uint32Array(count)
  const xs = new Float64Array(count)
  const ys = new Float64Array(count)
  for (let i = 0; i < count; i++) {
    const at = fill[cellOf[i]!]!++
    order[at] = i
    xs[at] = x[i]!
    ys[at] = y[i]!
  }
  return { cell, columns, rows, x0: xMin, y0: yMin, order, xs, ys, start }
}

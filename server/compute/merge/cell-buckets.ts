/**
 * A hashed uniform grid: points are bucketed by the cell of side `cellSize` that holds them, so a
 * search within one cell side only visits the 3 × 3 cells around the query. Cells are hashed into a
 * power-of-two table sized to the points, not to the field, so memory stays O(points) however large
 * or sparse the field is. Different cells may share a bucket; callers check real distances anyway.
 */
export class CellBuckets {
  private offsets = new Uint32Array(2)
  private members = new Uint32Array(0)
  private bucketOfItem = new Uint32Array(0)
  private mask = 0
  private inverseCell = 1

  /** Buckets the points with ids ids[0 … count − 1] at (xs[id], ys[id]). */
  build(ids: Uint32Array, count: number, xs: Float64Array, ys: Float64Array, cellSize: number) {
    let tableSize = 2
    while (tableSize < 2 * count) tableSize *= 2
    this.mask = tableSize - 1
    this.inverseCell = 1 / cellSize
    if (this.offsets.length < tableSize + 1) this.offsets = new Uint32Array(2 * tableSize + 1)
    if (this.members.length < count) {
      this.members = new Uint32Array(2 * count)
      this.bucketOfItem = new Uint32Array(2 * count)
    }
    const offsets = this.offsets
    offsets.fill(0, 0, tableSize + 1)
    for (let k = 0; k < count; k++) {
      const id = ids[k] ?? 0
      const bucket = this.bucketOfCell(this.cellOf(xs[id] ?? 0), this.cellOf(ys[id] ?? 0))
      this.bucketOfItem[k] = bucket
      offsets[bucket] = (offsets[bucket] ?? 0) + 1
    }
    // Inclusive prefix sums put each bucket's end in its slot; filling backwards moves it to its start.
    for (let b = 1; b < tableSize; b++) offsets[b] = (offsets[b] ?? 0) + (offsets[b - 1] ?? 0)
    for (let k = count - 1; k >= 0; k--) {
      const bucket = this.bucketOfItem[k] ?? 0
      const at = (offsets[bucket] ?? 0) - 1
      offsets[bucket] = at
      this.members[at] = ids[k] ?? 0
    }
    offsets[tableSize] = count
  }

  /** Integer cell coordinate of a position along one axis. */
  cellOf(position: number): number {
    return Math.floor(position * this.inverseCell)
  }

  /** Bucket holding cell (cellX, cellY). */
  bucketOfCell(cellX: number, cellY: number): number {
    const h = Math.imul(cellX, 0x9e3779b1) ^ Math.imul(cellY, 0x85ebca77)
    return (h ^ (h >>> 15)) & this.mask
  }

  /** First member index of a bucket; members of bucket b are memberAt(start(b)) … memberAt(end(b) − 1). */
  start(bucket: number): number {
    return this.offsets[bucket] ?? 0
  }

  end(bucket: number): number {
    return this.offsets[bucket + 1] ?? 0
  }

  memberAt(index: number): number {
    return this.members[index] ?? 0
  }
}

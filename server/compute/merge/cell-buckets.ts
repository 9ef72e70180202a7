/**
 * A hashed uniform grid: points are bucketed by the cell of side 2 × `radius` that holds them, so a
 * search within `radius` only visits the 2 × 2 cells on the query's side of its own cell. Cells are
 * hashed into a power-of-two table of ~8 buckets per point, sized to the points, not to the field, so
 * memory stays O(points) however large or sparse the field is. Different cells may share a bucket;
 * callers check real distances anyway.
 */
export class CellBuckets {
  private offsets = new Uint32Array(2)
  private members = new Uint32Array(0)
  private bucketOfItem = new Uint32Array(0)
  private mask = 0
  private inverseCell = 1
  /** The four buckets found by the last `findNearBuckets` call. */
  readonly nearBuckets = new Uint32Array(4)

  /** Buckets the points with ids ids[0 … count − 1] at (xs[id], ys[id]). */
  build(
    ids: Uint32Array,
    count: number,
    xs: ArrayLike<number>,
    ys: ArrayLike<number>,
    radius: number,
  ) {
    let tableSize = 2
    while (tableSize < 8 * count) tableSize *= 2
    this.mask = tableSize - 1
    this.inverseCell = 1 / (2 * radius)
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

  /** Fills `nearBuckets` with the buckets of every cell holding points within `radius` of (x, y). */
  findNearBuckets(x: number, y: number) {
    const scaledX = x * this.inverseCell
    const scaledY = y * this.inverseCell
    const cellX = Math.floor(scaledX)
    const cellY = Math.floor(scaledY)
    const sideX = scaledX - cellX < 0.5 ? -1 : 1
    const sideY = scaledY - cellY < 0.5 ? -1 : 1
    this.nearBuckets[0] = this.bucketOfCell(cellX, cellY)
    this.nearBuckets[1] = this.bucketOfCell(cellX + sideX, cellY)
    this.nearBuckets[2] = this.bucketOfCell(cellX, cellY + sideY)
    this.nearBuckets[3] = this.bucketOfCell(cellX + sideX, cellY + sideY)
  }

  private cellOf(position: number): number {
    return Math.floor(position * this.inverseCell)
  }

  private bucketOfCell(cellX: number, cellY: number): number {
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

/**
 * State of the events that can still be extended, in reusable slots: a closed event gives its slot
 * back, so memory follows the number of open events (rows in the last few frames), not the table.
 */
export class OpenEvents {
  /** Slots of open events, oldest first: slots[0 … count − 1]. */
  slots = new Uint32Array(256)
  count = 0
  eventOfSlot = new Uint32Array(256)
  meanX = new Float64Array(256)
  meanY = new Float64Array(256)
  weight = new Float64Array(256)
  lastFrame = new Uint32Array(256)
  private free = new Uint32Array(256)
  private freeCount = 0
  private used = 0
  private started = new Uint32Array(256)
  private startedCount = 0

  /** Closes every event last seen before `oldestFrame`. */
  closeLastSeenBefore(oldestFrame: number) {
    let kept = 0
    for (let k = 0; k < this.count; k++) {
      const slot = this.slots[k] ?? 0
      if ((this.lastFrame[slot] ?? 0) >= oldestFrame) this.slots[kept++] = slot
      else this.free[this.freeCount++] = slot
    }
    this.count = kept
  }

  /** Opens event `event` at a row; it joins the searchable set after this frame. Returns `event`. */
  start(event: number, x: number, y: number, weight: number, frame: number): number {
    const slot = this.takeSlot()
    this.eventOfSlot[slot] = event
    this.meanX[slot] = x
    this.meanY[slot] = y
    this.weight[slot] = weight
    this.lastFrame[slot] = frame
    if (this.startedCount === this.started.length) this.started = grown(this.started)
    this.started[this.startedCount++] = slot
    return event
  }

  /** Adds a row to the event in `slot` (running weighted mean). Returns the event id. */
  extend(slot: number, x: number, y: number, weight: number, frame: number): number {
    const total = (this.weight[slot] ?? 0) + weight
    const share = weight / total
    this.meanX[slot] = (this.meanX[slot] ?? 0) + share * (x - (this.meanX[slot] ?? 0))
    this.meanY[slot] = (this.meanY[slot] ?? 0) + share * (y - (this.meanY[slot] ?? 0))
    this.weight[slot] = total
    this.lastFrame[slot] = frame
    return this.eventOfSlot[slot] ?? 0
  }

  /** Makes the events started in this frame searchable from the next frame on. */
  admitStarted() {
    while (this.count + this.startedCount > this.slots.length) this.slots = grown(this.slots)
    this.slots.set(this.started.subarray(0, this.startedCount), this.count)
    this.count += this.startedCount
    this.startedCount = 0
  }

  private takeSlot(): number {
    if (this.freeCount > 0) return this.free[--this.freeCount] ?? 0
    if (this.used === this.meanX.length) this.growSlots()
    return this.used++
  }

  private growSlots() {
    this.eventOfSlot = grown(this.eventOfSlot)
    this.meanX = grown(this.meanX)
    this.meanY = grown(this.meanY)
    this.weight = grown(this.weight)
    this.lastFrame = grown(this.lastFrame)
    this.free = grown(this.free)
  }
}

function grown<T extends Float64Array | Uint32Array>(array: T): T {
  const bigger =
    array instanceof Float64Array
      ? new Float64Array(array.length * 2)
      : new Uint32Array(array.length * 2)
  bigger.set(array)
  return bigger as T
}

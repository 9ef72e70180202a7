/**
 * Growable typed columns for the rows of one chunk, one per slot of the plan, and the checks a
 * value must pass to be stored. Each storage kind has its own array list so every store site sees
 * one typed-array class (V8 keeps such element accesses fast). With the WebAssembly fast path
 * (plain-rows.ts) the arrays are views of its memory, and it is told where each one is.
 */
import type { ParsePlan, StorageKind } from './parse-plan'
import { FIELD_KIND, type PlainRows } from './plain-rows'
import { REJECT_REASONS, type RejectReason } from './rejections'
import { BYTES_PER_VALUE } from '../store/store-columns'
import type { StoredArray } from './stored-array'

/** 0 is "accepted"; a reason's code is its index in REJECT_REASONS plus one. */
export const ACCEPTED = 0
export const reasonCode = (reason: RejectReason) => REJECT_REASONS.indexOf(reason) + 1
export const reasonOf = (code: number): RejectReason => REJECT_REASONS[code - 1] ?? 'not_a_number'

const F32 = 0
const F64 = 1
const U32 = 2
const U16 = 3
const KIND_CODES: Record<StorageKind, number> = {
  float32: F32,
  float64: F64,
  uint32: U32,
  uint16: U16,
}
const NEGATIVE_FRAME = reasonCode('negative_frame')
const NON_INTEGER = reasonCode('non_integer')
const OUT_OF_RANGE = reasonCode('out_of_range')

export class SlotColumns {
  readonly count: number
  private readonly kinds: Uint8Array
  private readonly scales: Float64Array
  private readonly offsets: Float64Array
  private readonly maxima: Float64Array
  private readonly negativeCodes: Uint8Array
  private f32: Float32Array<ArrayBuffer>[] = []
  private f64: Float64Array<ArrayBuffer>[] = []
  private u32: Uint32Array<ArrayBuffer>[] = []
  private u16: Uint16Array<ArrayBuffer>[] = []
  /** Byte addresses of the slots' arrays in the fast path's memory. */
  private addresses: number[] = []
  capacity = 0

  constructor(
    private readonly plan: ParsePlan,
    private readonly shared: PlainRows | null = null,
  ) {
    const slots = plan.slots
    this.count = slots.length
    this.kinds = Uint8Array.from(slots, (s) => KIND_CODES[s.storage])
    this.scales = Float64Array.from(slots, (s) => s.scale)
    this.offsets = Float64Array.from(slots, (s) => s.offset)
    this.maxima = Float64Array.from(slots, (s) => s.maxValue)
    this.negativeCodes = Uint8Array.from(slots, (s) =>
      s.role === 'frame' ? NEGATIVE_FRAME : OUT_OF_RANGE,
    )
  }

  /**
   * Room for a new chunk's rows; the arrays are reused when they are large enough. (In the fast
   * path's memory they are laid out anew: loading the chunk freed them.)
   */
  reset(capacity: number) {
    if (capacity <= this.capacity && !this.shared) return
    this.capacity = 0
    this.resize(capacity)
  }

  /** Stores `value` for `slot` at `row`; returns ACCEPTED or the reason code. */
  store(slot: number, row: number, value: number): number {
    const kind = this.kinds[slot]!
    if (kind === F32) {
      this.f32[slot]![row] = value * this.scales[slot]!
      return ACCEPTED
    }
    if (kind === F64) {
      this.f64[slot]![row] = value * this.scales[slot]!
      return ACCEPTED
    }
    const stored = value - this.offsets[slot]!
    if (stored < 0) return this.negativeCodes[slot]!
    if (Math.floor(stored) !== stored) return NON_INTEGER
    if (stored > this.maxima[slot]!) return OUT_OF_RANGE
    if (kind === U32) this.u32[slot]![row] = stored
    else this.u16[slot]![row] = stored
    return ACCEPTED
  }

  grow() {
    this.resize(Math.ceil(this.capacity * 1.5) + 1024)
  }

  /** The first `rows` values of every slot: views, valid until the next chunk is parsed. */
  take(rows: number): StoredArray[] {
    return Array.from({ length: this.count }, (_, s) => this.arrayOf(s).subarray(0, rows))
  }

  private arrayOf(slot: number): StoredArray {
    const kind = this.kinds[slot]!
    if (kind === F32) return this.f32[slot]!
    if (kind === F64) return this.f64[slot]!
    return kind === U32 ? this.u32[slot]! : this.u16[slot]!
  }

  private resize(capacity: number) {
    if (this.shared) return this.resizeShared(this.shared, capacity)
    const used = this.capacity
    const mine = (kind: number) => Array.from(this.kinds, (k) => (k === kind ? capacity : 0))
    this.f32 = mine(F32).map((n, s) => resized(Float32Array, this.f32[s], used, n))
    this.f64 = mine(F64).map((n, s) => resized(Float64Array, this.f64[s], used, n))
    this.u32 = mine(U32).map((n, s) => resized(Uint32Array, this.u32[s], used, n))
    this.u16 = mine(U16).map((n, s) => resized(Uint16Array, this.u16[s], used, n))
    this.capacity = capacity
  }

  /** New arrays in the shared memory, the rows so far copied over, and the fast path told. */
  private resizeShared(shared: PlainRows, capacity: number) {
    const used = this.capacity
    const widths = this.plan.slots.map((slot) => BYTES_PER_VALUE[slot.storage])
    const addresses = widths.map((width) => shared.alloc(capacity * width))
    if (used > 0) widths.forEach((w, s) => shared.copy(addresses[s]!, this.addresses[s]!, used * w))
    this.addresses = addresses
    this.capacity = capacity
    this.viewShared(shared)
    this.plan.slots.forEach((slot, s) => {
      const factor = slot.storage.startsWith('float') ? slot.scale : slot.offset
      shared.bindField(slot.field, FIELD_KIND[slot.storage], addresses[s]!, factor, slot.maxValue)
    })
  }

  /** The arrays as views of the shared memory's current buffer. */
  private viewShared(shared: PlainRows) {
    const view = <T>(kind: number, make: new (b: ArrayBuffer, at: number, n: number) => T) =>
      Array.from(
        this.kinds,
        (k, s) => new make(shared.buffer, this.addresses[s]!, k === kind ? this.capacity : 0),
      )
    this.f32 = view(F32, Float32Array)
    this.f64 = view(F64, Float64Array)
    this.u32 = view(U32, Uint32Array)
    this.u16 = view(U16, Uint16Array)
  }
}

function resized<T extends StoredArray>(
  make: new (length: number) => T,
  previous: T | undefined,
  used: number,
  length: number,
): T {
  const next = new make(length)
  if (previous && length > 0 && used > 0) next.set(previous.subarray(0, used))
  return next
}

/**
 * The chunk parser's fast path, in AssemblyScript (compiled to WebAssembly by `npm run
 * build:wasm` into ../plain-rows.wasm.ts). It stores rows whose every field is a plain decimal
 * number, `[-]digits[.digits]` with at most 15 digits, straight into the typed columns that
 * chunk.parser.ts hands it, and stops at the first row that is anything else (quotes, words,
 * empty fields, long mantissas, large exponents, a wrong field count, an integer out of range, a
 * blank line), which the TypeScript parser then reads, judges and counts. A number here is
 * `[+-]digits[.digits][(e|E)[+-]digits]` with at most 15 digits and a net power of ten within
 * ±22, padded or not, and reads to the double decimal.scanner.ts gives: the mantissa is exact
 * below 2^53, as is 10^k for k ≤ 22, so one multiplication or division is the correctly rounded
 * value (Clinger 1990, "How to read floating point numbers accurately").
 *
 * Memory: this module's static data sits below `dataStart()`; the caller lays the chunk's bytes
 * and the columns out above it.
 */

// Field kinds; slot.columns.ts passes the same codes.
const SKIP: u8 = 0
const FLOAT32: u8 = 1
const FLOAT64: u8 = 2
const UINT32: u8 = 3
const UINT16: u8 = 4

const LF: u32 = 10
const CR: u32 = 13
const TAB: u32 = 9
const SPACE: u32 = 32
const QUOTE: u32 = 34
const PLUS: u32 = 43
const MINUS: u32 = 45
const ZERO: u32 = 48
const LOWER_E: u32 = 101
const CASE_BIT: u32 = 0x20
const MAX_DIGITS: i32 = 15
const MAX_EXPONENT: i32 = 22

/** Tables with more fields than this are read by the TypeScript parser alone. */
export const MAX_FIELDS: i32 = 512

/** Per field: its kind (u8), its column's address (u32), scale or offset (f64), largest integer (f64). */
const kinds = memory.data(MAX_FIELDS)
const columns = memory.data(MAX_FIELDS * 4, 4)
const factors = memory.data(MAX_FIELDS * 8, 8)
const maxima = memory.data(MAX_FIELDS * 8, 8)
const POW10 = memory.data<f64>([
  1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17,
  1e18, 1e19, 1e20, 1e21, 1e22,
])

let fieldCount: i32 = 0
let delimiter: u32 = 44
let decimalMark: u32 = 46
/** Whether a tab pads fields (it does unless it separates them); a space always does. */
let tabPads: bool = true
let parsed: u32 = 0
let value: f64 = 0

/** The first address free for the caller's data, 64-byte aligned. */
export function dataStart(): usize {
  return (__heap_base + 63) & ~63
}

export function setFormat(fields: i32, delimiterByte: u32, decimalByte: u32): void {
  fieldCount = fields
  delimiter = delimiterByte
  decimalMark = decimalByte
  tabPads = delimiterByte != TAB
}

/**
 * Field `field` goes to the column at `address` (one value per row): floats are multiplied by
 * `factor` (the unit's scale); integers have `factor` (the offset) taken off and must then lie
 * in [0, max]. A field of kind SKIP is not stored.
 */
export function setField(field: i32, kind: u8, address: u32, factor: f64, max: f64): void {
  store<u8>(kinds + field, kind)
  store<u32>(columns + ((<usize>field) << 2), address)
  store<f64>(factors + ((<usize>field) << 3), factor)
  store<f64>(maxima + ((<usize>field) << 3), max)
}

/** Rows stored by the last `parseRows`. */
export function rowsParsed(): u32 {
  return parsed
}

/**
 * Stores plain rows from address `at` (the start of a row) as rows `row`, `row + 1`, …, until
 * `end`, a row that is not plain, or `capacity` rows. Returns the address where it stopped.
 * The bytes must go on past `end` with a line feed or a zero byte (the caller's sentinel).
 */
export function parseRows(at: usize, end: usize, row: u32, capacity: u32): usize {
  let p = at
  let r = row
  while (p < end && r < capacity) {
    const next = plainRow(p, r)
    if (next == 0) break
    p = next
    r++
  }
  parsed = r - row
  return p
}

/** The row at `start` stored as row `row`; returns the start of the next one, or 0 if not plain. */
function plainRow(start: usize, row: u32): usize {
  let p = start
  const last = fieldCount - 1
  for (let field = 0; field < fieldCount; field++) {
    const kind = load<u8>(kinds + field)
    p = kind == SKIP ? skipField(p) : plainNumber(p)
    if (p == 0) return 0
    if (kind != SKIP && !storeValue(field, kind, row)) return 0
    const c = <u32>load<u8>(p)
    if (field < last) {
      if (c != delimiter) return 0
      p++
    } else if (c == LF) p++
    else if (c == CR && <u32>load<u8>(p + 1) == LF) p += 2
    else return 0
  }
  return p
}

/** A number at `start` (after padding) into `value`; returns where its padding ends, or 0. */
@inline
function plainNumber(start: usize): usize {
  let p = skipPads(start)
  let c = <u32>load<u8>(p)
  const negative = c == MINUS
  if (negative || c == PLUS) c = <u32>load<u8>(++p)
  const digitsStart = p
  let mantissa: u64 = 0
  while (c - ZERO < 10) {
    mantissa = mantissa * 10 + <u64>(c - ZERO)
    c = <u32>load<u8>(++p)
  }
  let digits = <i32>(p - digitsStart)
  let exponent: i32 = 0
  if (c == decimalMark) {
    const fractionStart = ++p
    c = <u32>load<u8>(p)
    while (c - ZERO < 10) {
      mantissa = mantissa * 10 + <u64>(c - ZERO)
      c = <u32>load<u8>(++p)
    }
    exponent = <i32>(fractionStart - p)
    digits -= exponent
  }
  if (digits == 0) return 0
  if ((c | CASE_BIT) == LOWER_E) {
    p = scanExponent(p + 1)
    if (p == 0) return 0
    exponent += exponentRead
  }
  if (digits > MAX_DIGITS || exponent > MAX_EXPONENT || exponent < -MAX_EXPONENT) return 0
  const m = <f64>mantissa
  const magnitude =
    exponent < 0
      ? m / load<f64>(POW10 + ((<usize>-exponent) << 3))
      : m * load<f64>(POW10 + ((<usize>exponent) << 3))
  value = negative ? -magnitude : magnitude
  return skipPads(p)
}

let exponentRead: i32 = 0

/** The integer after `e` into `exponentRead`; its end, or 0 when no digit follows. */
@inline
function scanExponent(start: usize): usize {
  let p = start
  let c = <u32>load<u8>(p)
  const negative = c == MINUS
  if (negative || c == PLUS) c = <u32>load<u8>(++p)
  if (c - ZERO >= 10) return 0
  let e: i32 = 0
  while (c - ZERO < 10) {
    if (e < 100_000) e = e * 10 + <i32>(c - ZERO)
    c = <u32>load<u8>(++p)
  }
  exponentRead = negative ? -e : e
  return p
}

@inline
function skipPads(start: usize): usize {
  let p = start
  let c = <u32>load<u8>(p)
  while (c == SPACE || (c == TAB && tabPads)) c = <u32>load<u8>(++p)
  return p
}

/** Stores `value` for `field`; false when an integer field's value does not fit. */
@inline
function storeValue(field: i32, kind: u8, row: u32): bool {
  const column = <usize>load<u32>(columns + ((<usize>field) << 2))
  const factor = load<f64>(factors + ((<usize>field) << 3))
  if (kind == FLOAT32) {
    store<f32>(column + ((<usize>row) << 2), <f32>(value * factor))
    return true
  }
  if (kind == FLOAT64) {
    store<f64>(column + ((<usize>row) << 3), value * factor)
    return true
  }
  const stored = value - factor
  if (stored < 0 || Math.floor(stored) != stored) return false
  if (stored > load<f64>(maxima + ((<usize>field) << 3))) return false
  if (kind == UINT32) store<u32>(column + ((<usize>row) << 2), <u32>stored)
  else store<u16>(column + ((<usize>row) << 1), <u16>stored)
  return true
}

/** A field nothing is read from: its end, or 0 when it is quoted. */
@inline
function skipField(start: usize): usize {
  let p = skipPads(start)
  let c = <u32>load<u8>(p)
  if (c == QUOTE) return 0
  while (c != delimiter && c != LF && c != CR && c != 0) c = <u32>load<u8>(++p)
  return p
}

// Grouping a parsed chunk by tile (chunk.processor.ts): each row's tile key, then every column
// moved into tile order by a counting sort, tallying its min, max and NaNs on the way.

let tallyMin: f64 = 0
let tallyMax: f64 = 0
let tallyMissing: u32 = 0

export function tallyOf(which: i32): f64 {
  return which == 0 ? tallyMin : which == 1 ? tallyMax : <f64>tallyMissing
}

/**
 * Tile keys (u16) of `rows` rows from x and y (f32): column ⌊(x − originX)·perNm⌋ and row
 * ⌊(y − originY)·perNm⌋, clamped to the grid, key = row·columns + column. Counts each tile's
 * rows into starts[key + 1] and turns them into first rows; keeps each tile's x and y range
 * (min, max pairs, f64). Returns how many rows lay outside the grid.
 */
export function tileKeys(
  xAt: usize,
  yAt: usize,
  rows: u32,
  originX: f64,
  originY: f64,
  perNm: f64,
  gridColumns: i32,
  gridRows: i32,
  keysAt: usize,
  startsAt: usize,
  xRangesAt: usize,
  yRangesAt: usize,
): u32 {
  const tiles = gridColumns * gridRows
  memory.fill(startsAt, 0, (<usize>tiles + 1) << 2)
  for (let k = 0; k < tiles; k++) {
    const at = (<usize>k) << 4
    store<f64>(xRangesAt + at, Infinity)
    store<f64>(xRangesAt + at + 8, -Infinity)
    store<f64>(yRangesAt + at, Infinity)
    store<f64>(yRangesAt + at + 8, -Infinity)
  }
  const lastColumn = <f64>gridColumns
  const lastRow = <f64>gridRows
  let outside: u32 = 0
  for (let i: u32 = 0; i < rows; i++) {
    const x = <f64>load<f32>(xAt + ((<usize>i) << 2))
    const y = <f64>load<f32>(yAt + ((<usize>i) << 2))
    const fc = (x - originX) * perNm
    const fr = (y - originY) * perNm
    if (fc < 0 || fr < 0 || fc >= lastColumn || fr >= lastRow) outside++
    const c = fc >= lastColumn ? gridColumns - 1 : fc > 0 ? <i32>fc : 0
    const r = fr >= lastRow ? gridRows - 1 : fr > 0 ? <i32>fr : 0
    const k = r * gridColumns + c
    store<u16>(keysAt + ((<usize>i) << 1), <u16>k)
    const count = startsAt + ((<usize>k + 1) << 2)
    store<u32>(count, load<u32>(count) + 1)
    const range = (<usize>k) << 4
    if (x < load<f64>(xRangesAt + range)) store<f64>(xRangesAt + range, x)
    if (x > load<f64>(xRangesAt + range + 8)) store<f64>(xRangesAt + range + 8, x)
    if (y < load<f64>(yRangesAt + range)) store<f64>(yRangesAt + range, y)
    if (y > load<f64>(yRangesAt + range + 8)) store<f64>(yRangesAt + range + 8, y)
  }
  for (let k = 1; k <= tiles; k++) {
    const at = startsAt + ((<usize>k) << 2)
    store<u32>(at, load<u32>(at) + load<u32>(at - 4))
  }
  return outside
}

/**
 * Moves row i of the column at `fromAt` to row cursor[key[i]]++ at `toAt` (stable: rows keep
 * their order within a tile), tallying min, max and NaNs (tallyOf). `width` is the value's
 * size in bytes and `kind` its type (the FLOAT32 … UINT16 codes above).
 */
export function scatter(
  kind: u8,
  fromAt: usize,
  toAt: usize,
  rows: u32,
  keysAt: usize,
  cursorAt: usize,
): void {
  if (kind == FLOAT32) scatterTyped<f32>(fromAt, toAt, rows, keysAt, cursorAt)
  else if (kind == FLOAT64) scatterTyped<f64>(fromAt, toAt, rows, keysAt, cursorAt)
  else if (kind == UINT32) scatterTyped<u32>(fromAt, toAt, rows, keysAt, cursorAt)
  else scatterTyped<u16>(fromAt, toAt, rows, keysAt, cursorAt)
}

function scatterTyped<T>(
  fromAt: usize,
  toAt: usize,
  rows: u32,
  keysAt: usize,
  cursorAt: usize,
): void {
  const shift = alignof<T>()
  let min: f64 = Infinity
  let max: f64 = -Infinity
  let missing: u32 = 0
  for (let i: u32 = 0; i < rows; i++) {
    const v = load<T>(fromAt + ((<usize>i) << shift))
    const cursor = cursorAt + ((<usize>load<u16>(keysAt + ((<usize>i) << 1))) << 2)
    const to = load<u32>(cursor)
    store<u32>(cursor, to + 1)
    store<T>(toAt + ((<usize>to) << shift), v)
    const f = <f64>v
    if (f < min) min = f
    if (f > max) max = f
    if (f != f) missing++
  }
  tallyMin = min
  tallyMax = max
  tallyMissing = missing
}

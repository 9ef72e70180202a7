import { FIELD_TYPE_BYTES } from './tiff.constants'
import type { RandomAccessFile } from './random-access.file'
import { RawStackError } from './raw-stack.error'

/** Where one tag's values are in the file (inline values point into the entry itself). */
export interface EntryRef {
  tag: number
  type: number
  count: number
  position: number
}

const TWO_32 = 2 ** 32

/** Reads an unsigned integer of a TIFF field type, NaN for other types; 64-bit values must stay below 2^53. */
export function readUnsigned(
  view: DataView,
  at: number,
  type: number,
  littleEndian: boolean,
): number {
  switch (type) {
    case 1:
    case 7:
      return view.getUint8(at)
    case 3:
      return view.getUint16(at, littleEndian)
    case 4:
    case 13:
      return view.getUint32(at, littleEndian)
    case 16:
    case 18:
      return readUint64(view, at, littleEndian)
    default:
      return Number.NaN
  }
}

export function readUint64(view: DataView, at: number, littleEndian: boolean): number {
  const low = view.getUint32(littleEndian ? at : at + 4, littleEndian)
  const high = view.getUint32(littleEndian ? at + 4 : at, littleEndian)
  if (high >= 2 ** 21) throw new RawStackError('malformed', 'A 64-bit offset is beyond 2^53 bytes')
  return high * TWO_32 + low
}

export function entryByteLength(ref: EntryRef): number {
  return (FIELD_TYPE_BYTES[ref.type] ?? 0) * ref.count
}

/** Loads an entry's values into the file window and returns where they start in it. */
function locateValues(file: RandomAccessFile, ref: EntryRef, what: string): number {
  const length = entryByteLength(ref)
  const at = file.locate(ref.position, length)
  if (at < 0) {
    throw new RawStackError(
      'truncated',
      `Truncated file: it ends at byte ${file.size} but ${what} points to byte ${ref.position + length}`,
    )
  }
  return at
}

/** All values of an integer-typed entry (offsets, byte counts, bits per sample). */
export function readUnsignedValues(
  file: RandomAccessFile,
  ref: EntryRef,
  littleEndian: boolean,
  what: string,
): Float64Array {
  const size = FIELD_TYPE_BYTES[ref.type] ?? 0
  const at = locateValues(file, ref, what)
  const values = new Float64Array(ref.count)
  for (let i = 0; i < ref.count; i++)
    values[i] = readUnsigned(file.view, at + i * size, ref.type, littleEndian)
  if (ref.count > 0 && Number.isNaN(values[0])) {
    throw new RawStackError('malformed', `${what} has field type ${ref.type}, not an integer type`)
  }
  return values
}

/** An ASCII or UNDEFINED entry as UTF-8 text, trailing NULs removed (OME-XML is UTF-8). */
export function readEntryText(file: RandomAccessFile, ref: EntryRef, what: string): string {
  const at = locateValues(file, ref, what)
  let end = at + entryByteLength(ref)
  while (end > at && file.bytes[end - 1] === 0) end--
  return file.bytes.toString('utf8', at, end)
}

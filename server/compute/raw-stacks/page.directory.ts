import type { RandomAccessFile } from './random-access.file'
import { RawStackError } from './raw-stack.error'
import { FIELD_TYPE_BYTES, TAG } from './tiff.constants'
import { type EntryRef, readUnsigned } from './ifd-values.reader'

/** What one IFD says about its page; value arrays stay in the file until a reader needs them. */
export interface PageDirectory {
  index: number
  ifdOffset: number
  nextIfdOffset: number
  width: number
  height: number
  bitsPerSample: number
  samplesPerPixel: number
  sampleFormatCode: number
  compressionCode: number
  planarConfigurationCode: number
  predictor: number
  rowsPerStrip: number
  subfileType: number
  tiled: boolean
  stripOffsets: EntryRef | null
  stripByteCounts: EntryRef | null
  description: EntryRef | null
}

/** One IFD's entry table, loaded at `view[start]` (file position `position`). */
export interface EntryTable {
  view: DataView
  start: number
  position: number
  count: number
  entryBytes: number
  offsetBytes: number
  offsetType: number
  littleEndian: boolean
}

/** RowsPerStrip's default, 2^32 − 1, means "one strip for the whole page" (TIFF 6.0). */
const ONE_STRIP = 2 ** 32 - 1

function emptyPage(index: number, ifdOffset: number): PageDirectory {
  return {
    index,
    ifdOffset,
    nextIfdOffset: 0,
    width: 0,
    height: 0,
    bitsPerSample: 1,
    samplesPerPixel: 1,
    sampleFormatCode: 1,
    compressionCode: 1,
    planarConfigurationCode: 1,
    predictor: 1,
    rowsPerStrip: ONE_STRIP,
    subfileType: 0,
    tiled: false,
    stripOffsets: null,
    stripByteCounts: null,
    description: null,
  }
}

/** Where entry `at`'s values are: its own value field when they fit (left-justified), else elsewhere. */
function refAt(table: EntryTable, at: number, tag: number): EntryRef {
  const { view, offsetBytes, offsetType, littleEndian } = table
  const type = view.getUint16(at + 2, littleEndian)
  const count = readUnsigned(view, at + 4, offsetType, littleEndian)
  const field = at + 4 + offsetBytes
  const inline = count * (FIELD_TYPE_BYTES[type] ?? 0) <= offsetBytes
  const position = inline
    ? table.position + (field - table.start)
    : readUnsigned(view, field, offsetType, littleEndian)
  return { tag, type, count, position }
}

function noInteger(tag: number, type: number): RawStackError {
  return new RawStackError('malformed', `Tag ${tag} holds no readable integer (type ${type})`)
}

/** The first value of an entry stored elsewhere (e.g. BitsPerSample of an RGB page). */
function firstValueElsewhere(file: RandomAccessFile, ref: EntryRef, littleEndian: boolean): number {
  const at = file.locate(ref.position, FIELD_TYPE_BYTES[ref.type] ?? 0)
  const value =
    at >= 0 && ref.count > 0 ? readUnsigned(file.view, at, ref.type, littleEndian) : Number.NaN
  if (Number.isNaN(value)) throw noInteger(ref.tag, ref.type)
  return value
}

/** Sets a scalar field of the page; false when the tag is not one. */
function setScalar(page: PageDirectory, tag: number, value: number): boolean {
  switch (tag) {
    case TAG.newSubfileType:
      page.subfileType = value
      break
    case TAG.imageWidth:
      page.width = value
      break
    case TAG.imageLength:
      page.height = value
      break
    case TAG.bitsPerSample:
      page.bitsPerSample = value
      break
    case TAG.compression:
      page.compressionCode = value
      break
    case TAG.samplesPerPixel:
      page.samplesPerPixel = value
      break
    case TAG.rowsPerStrip:
      page.rowsPerStrip = value
      break
    case TAG.planarConfiguration:
      page.planarConfigurationCode = value
      break
    case TAG.predictor:
      page.predictor = value
      break
    case TAG.sampleFormat:
      page.sampleFormatCode = value
      break
    default:
      return false
  }
  return true
}

const SCALAR_TAGS: ReadonlySet<number> = new Set([
  TAG.newSubfileType,
  TAG.imageWidth,
  TAG.imageLength,
  TAG.bitsPerSample,
  TAG.compression,
  TAG.samplesPerPixel,
  TAG.rowsPerStrip,
  TAG.planarConfiguration,
  TAG.predictor,
  TAG.sampleFormat,
])

/** Decodes the entries a page needs in one pass over its entry table, allocating little. */
export function parseDirectory(
  file: RandomAccessFile,
  table: EntryTable,
  index: number,
  ifdOffset: number,
) {
  const { view, littleEndian: le, offsetBytes, offsetType } = table
  const page = emptyPage(index, ifdOffset)
  // Values stored elsewhere are read after the loop: a read may reuse the memory of `view`.
  const later: EntryRef[] = []
  for (let i = 0, at = table.start; i < table.count; i++, at += table.entryBytes) {
    const tag = view.getUint16(at, le)
    if (SCALAR_TAGS.has(tag)) {
      const type = view.getUint16(at + 2, le)
      const count = readUnsigned(view, at + 4, offsetType, le)
      if (count * (FIELD_TYPE_BYTES[type] ?? 0) > offsetBytes) later.push(refAt(table, at, tag))
      else {
        const value = count > 0 ? readUnsigned(view, at + 4 + offsetBytes, type, le) : Number.NaN
        if (Number.isNaN(value)) throw noInteger(tag, type)
        setScalar(page, tag, value)
      }
    } else if (tag === TAG.stripOffsets) page.stripOffsets = refAt(table, at, tag)
    else if (tag === TAG.stripByteCounts) page.stripByteCounts = refAt(table, at, tag)
    else if (tag === TAG.imageDescription) page.description = refAt(table, at, tag)
    else if (tag === TAG.tileOffsets || tag === TAG.tileWidth) page.tiled = true
  }
  page.nextIfdOffset = readUnsigned(
    view,
    table.start + table.count * table.entryBytes,
    offsetType,
    le,
  )
  for (const ref of later) setScalar(page, ref.tag, firstValueElsewhere(file, ref, le))
  if (page.width === 0 || page.height === 0) {
    throw new RawStackError(
      'malformed',
      `Frame ${index} (directory at byte ${ifdOffset}) has no image size`,
    )
  }
  // RowsPerStrip 0 is invalid; reading it as "one strip" keeps strip loops finite.
  page.rowsPerStrip = page.rowsPerStrip > 0 ? Math.min(page.rowsPerStrip, page.height) : page.height
  return page
}

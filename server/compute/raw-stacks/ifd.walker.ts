import { setImmediate as yieldToEventLoop } from 'node:timers/promises'
import type { RandomAccessFile } from './random-access.file'
import { RawStackError } from './raw-stack.error'
import type { TiffFileHeader } from './tiff-header.reader'
import { readUint64 } from './ifd-values.reader'
import { type PageDirectory, parseDirectory } from './page.directory'

/** Far above any real stack; stops a hostile file from growing the page list without end. */
const MAX_PAGES = 10_000_000
const MAX_ENTRIES = 4096
const PAGES_BETWEEN_YIELDS = 2048

/** Classic TIFF: 2-byte entry count, 12-byte entries, 4-byte counts and offsets; BigTIFF: 8, 20, 8. */
interface Layout {
  countBytes: number
  entryBytes: number
  offsetBytes: number
  /** The field type that reads a count or offset: LONG or LONG8. */
  offsetType: number
}

function layoutOf(header: TiffFileHeader): Layout {
  return header.kind === 'bigtiff'
    ? { countBytes: 8, entryBytes: 20, offsetBytes: 8, offsetType: 16 }
    : { countBytes: 2, entryBytes: 12, offsetBytes: 4, offsetType: 4 }
}

function truncated(file: RandomAccessFile, what: string): RawStackError {
  return new RawStackError('truncated', `Truncated file: it ends at byte ${file.size} but ${what}`)
}

/** Reads the directory at `offset`: its entry table and the pointer to the next one. */
function readDirectory(
  file: RandomAccessFile,
  header: TiffFileHeader,
  layout: Layout,
  offset: number,
  index: number,
): PageDirectory {
  const { countBytes, entryBytes, offsetBytes } = layout
  const le = header.littleEndian
  const at = file.locate(offset, countBytes)
  if (at < 0)
    throw truncated(file, `the directory of frame ${index} runs to byte ${offset + countBytes}`)
  const count = countBytes === 2 ? file.view.getUint16(at, le) : readUint64(file.view, at, le)
  if (count === 0 || count > MAX_ENTRIES) {
    throw new RawStackError(
      'malformed',
      `The directory of frame ${index} (byte ${offset}) claims ${count} entries`,
    )
  }
  const tableBytes = count * entryBytes + offsetBytes
  const start = file.locate(offset + countBytes, tableBytes)
  if (start < 0) {
    throw truncated(
      file,
      `the directory of frame ${index} runs to byte ${offset + countBytes + tableBytes}`,
    )
  }
  const table = {
    view: file.view,
    start,
    position: offset + countBytes,
    count,
    littleEndian: le,
    entryBytes,
    offsetBytes,
    offsetType: layout.offsetType,
  }
  return parseDirectory(file, table, index, offset)
}

function pointerName(index: number): string {
  return index === 0 ? 'the file header' : `frame ${index - 1}`
}

/**
 * Remembers which offsets hold directories. Writers almost always place each IFD after the
 * previous one, and a chain that only moves forward cannot loop, so offsets are indexed only
 * once the chain first steps back.
 */
class VisitedDirectories {
  private furthest = -1
  private indexed: Map<number, number> | null = null

  constructor(private readonly pages: PageDirectory[]) {}

  /** The frame whose directory is at `offset`, if one was already read there. */
  frameAt(offset: number): number | undefined {
    if (offset > this.furthest) return undefined
    this.indexed ??= new Map(this.pages.map((page) => [page.ifdOffset, page.index]))
    return this.indexed.get(offset)
  }

  add(page: PageDirectory) {
    this.furthest = Math.max(this.furthest, page.ifdOffset)
    this.indexed?.set(page.ifdOffset, page.index)
  }
}

/** Throws when `offset`, the directory of frame `index`, cannot be a new directory. */
function checkPointer(
  file: RandomAccessFile,
  header: TiffFileHeader,
  visited: VisitedDirectories,
  offset: number,
  index: number,
) {
  const earlier = visited.frameAt(offset)
  if (earlier !== undefined) {
    throw new RawStackError(
      'ifd-loop',
      `IFD chain loops back at byte ${offset}: ${pointerName(index)} points to the directory of frame ${earlier}`,
    )
  }
  if (offset >= file.size) {
    throw truncated(
      file,
      `${pointerName(index)} points to byte ${offset} (the directory of frame ${index})`,
    )
  }
  if (offset < header.headerBytes) {
    throw new RawStackError(
      'malformed',
      `${pointerName(index)} points to byte ${offset}, inside the file header`,
    )
  }
  if (index >= MAX_PAGES) throw new RawStackError('malformed', `More than ${MAX_PAGES} frames`)
}

/**
 * Follows the IFD chain from the header to its end without touching pixel data. Stops with a
 * clear error at a loop, at a pointer past the end of the file or into the header.
 */
export async function walkIfdChain(
  file: RandomAccessFile,
  header: TiffFileHeader,
  signal?: AbortSignal,
): Promise<PageDirectory[]> {
  const layout = layoutOf(header)
  const pages: PageDirectory[] = []
  const visited = new VisitedDirectories(pages)
  let offset = header.firstIfdOffset
  while (offset !== 0) {
    const index = pages.length
    checkPointer(file, header, visited, offset, index)
    const page = readDirectory(file, header, layout, offset, index)
    pages.push(page)
    visited.add(page)
    offset = page.nextIfdOffset
    if (index % PAGES_BETWEEN_YIELDS === PAGES_BETWEEN_YIELDS - 1) {
      await yieldToEventLoop()
      if (signal?.aborted)
        throw new RawStackError('aborted', 'Reading the frame directories was cancelled')
    }
  }
  if (pages.length === 0)
    throw new RawStackError('malformed', 'The file header points to no directory')
  return pages
}

import { walkIfdChain } from './ifd.walker'
import { readEntryText, readUnsignedValues } from './ifd-values.reader'
import { isOmeXml } from './ome-xml.detector'
import type { PageDirectory } from './page.directory'
import { RandomAccessFile } from './random-access.file'
import { RawStackError } from './raw-stack.error'
import type { PageInfo, StackHeader } from './raw-stack.types'
import { HEADER_PROBE_BYTES, type TiffFileHeader, parseTiffHeader } from './tiff-header.reader'
import { compressionName, sampleFormatName } from './tiff.constants'

/** An OME-XML header of 50 000 planes is a few MB; anything far larger is not a description. */
const MAX_DESCRIPTION_BYTES = 64 * 2 ** 20

/** An open stack: the caller closes `file`. */
export interface OpenStack {
  file: RandomAccessFile
  fileHeader: TiffFileHeader
  directories: PageDirectory[]
  header: StackHeader
}

function readFileHeader(file: RandomAccessFile): TiffFileHeader {
  const probe = file.read(0, Math.min(HEADER_PROBE_BYTES, file.size))
  const header = probe ? parseTiffHeader(probe) : null
  if (!header) throw new RawStackError('not-tiff', 'Not a TIFF or BigTIFF file (no TIFF header)')
  return header
}

function readOmeXml(file: RandomAccessFile, first: PageDirectory): string | null {
  const ref = first.description
  if (!ref || ref.count > MAX_DESCRIPTION_BYTES) return null
  const text = readEntryText(file, ref, 'the description of frame 0')
  return isOmeXml(text) ? text : null
}

/** A truncated upload usually loses the end of the last frame's pixels; checking two pages is cheap. */
function checkPixelExtent(file: RandomAccessFile, page: PageDirectory, littleEndian: boolean) {
  if (!page.stripOffsets || !page.stripByteCounts) return
  const what = `frame ${page.index}`
  const offsets = readUnsignedValues(
    file,
    page.stripOffsets,
    littleEndian,
    `${what} (strip offsets)`,
  )
  const counts = readUnsignedValues(
    file,
    page.stripByteCounts,
    littleEndian,
    `${what} (strip sizes)`,
  )
  for (let i = 0; i < offsets.length; i++) {
    const end = offsets[i]! + (counts[i] ?? 0)
    if (end > file.size) {
      throw new RawStackError(
        'truncated',
        `Truncated file: it ends at byte ${file.size} but ${what} points to byte ${end} (the end of its pixel data)`,
      )
    }
  }
}

function pageInfo(page: PageDirectory): PageInfo {
  return {
    ifdOffset: page.ifdOffset,
    width: page.width,
    height: page.height,
    bitsPerSample: page.bitsPerSample,
    compression: compressionName(page.compressionCode),
    subfileType: page.subfileType,
  }
}

export function sameLayout(a: PageDirectory, b: PageDirectory): boolean {
  return (
    a.width === b.width &&
    a.height === b.height &&
    a.bitsPerSample === b.bitsPerSample &&
    a.sampleFormatCode === b.sampleFormatCode &&
    a.samplesPerPixel === b.samplesPerPixel &&
    a.compressionCode === b.compressionCode
  )
}

function describe(
  file: RandomAccessFile,
  fileHeader: TiffFileHeader,
  pages: PageDirectory[],
): StackHeader {
  const first = pages[0]!
  const sampleFormat = sampleFormatName(first.sampleFormatCode)
  if (!sampleFormat) {
    throw new RawStackError(
      'unsupported',
      `Frame 0 has SampleFormat ${first.sampleFormatCode}, not uint, int or float`,
    )
  }
  return {
    format: fileHeader.kind === 'bigtiff' ? 'bigtiff' : 'tiff',
    byteOrder: fileHeader.littleEndian ? 'little-endian' : 'big-endian',
    fileBytes: file.size,
    width: first.width,
    height: first.height,
    bitsPerSample: first.bitsPerSample,
    sampleFormat,
    samplesPerPixel: first.samplesPerPixel,
    compression: compressionName(first.compressionCode),
    frames: pages.length,
    planarConfiguration: first.planarConfigurationCode === 2 ? 'planar' : 'chunky',
    omeXml: readOmeXml(file, first),
    uniformPages: pages.every((page) => sameLayout(page, first)),
    pages: pages.map(pageInfo),
  }
}

/** Opens a stack and reads its header and whole IFD chain, never its pixel data. */
export async function openStack(path: string, signal?: AbortSignal): Promise<OpenStack> {
  const file = RandomAccessFile.open(path)
  try {
    const fileHeader = readFileHeader(file)
    const directories = await walkIfdChain(file, fileHeader, signal)
    checkPixelExtent(file, directories[0]!, fileHeader.littleEndian)
    checkPixelExtent(file, directories[directories.length - 1]!, fileHeader.littleEndian)
    return { file, fileHeader, directories, header: describe(file, fileHeader, directories) }
  } catch (error) {
    file.close()
    throw error
  }
}

/** What a raw stack holds, from its header and IFD chain alone (milliseconds even for GBs). */
export async function readStackHeader(path: string): Promise<StackHeader> {
  const stack = await openStack(path)
  stack.file.close()
  return stack.header
}

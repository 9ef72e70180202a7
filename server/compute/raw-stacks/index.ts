/**
 * Raw camera stacks (TIFF, BigTIFF, OME-TIFF, one or several files): what they hold from their
 * headers alone, which files a multi-file OME-TIFF needs, and one streaming pass over all frames.
 */
export { detectTiff, detectTiffBytes, type TiffKind } from './tiff-header.reader'
export { readStackHeader } from './stack-header.service'
export { resolveOmeFileSet } from './ome-file-set.service'
export { isOmeXml } from './ome-xml.detector'
export { scanStack } from './stack-scan.service'
export { RawStackError, type RawStackErrorCode } from './raw-stack.error'
export type {
  ByteOrder,
  PageInfo,
  ScanOptions,
  StackHeader,
  StackScan,
  Thumbnail,
} from './raw-stack.types'
export type { OmeFilePart, OmeFileSet, OmeImage, TiffDataBlock } from './ome-file-set.types'
export type { SampleFormat } from './tiff.constants'

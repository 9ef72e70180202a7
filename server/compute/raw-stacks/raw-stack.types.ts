import type { SampleFormat } from './tiff.constants'

export type ByteOrder = 'little-endian' | 'big-endian'

/** Per-page facts that come free with the walk over the directories. */
export interface PageInfo {
  /** Where the page's IFD starts in the file. */
  ifdOffset: number
  width: number
  height: number
  bitsPerSample: number
  compression: string
  /** NewSubfileType: 0 for a full-resolution page, bit 0 set for a reduced-resolution one. */
  subfileType: number
}

export interface StackHeader {
  format: 'tiff' | 'bigtiff'
  byteOrder: ByteOrder
  fileBytes: number
  width: number
  height: number
  bitsPerSample: number
  sampleFormat: SampleFormat
  samplesPerPixel: number
  compression: string
  /** Number of IFDs (pages) in the main chain; frame indexes in messages count from 0. */
  frames: number
  planarConfiguration: 'chunky' | 'planar'
  /** The first IFD's ImageDescription when it is an OME-XML document, trailing NULs removed. */
  omeXml: string | null
  /** True when every page has the first page's size, sample type and compression. */
  uniformPages: boolean
  pages: PageInfo[]
}

export interface StackScan {
  frames: number
  width: number
  height: number
  /** Mean intensity of each frame, in file order across all paths. */
  meanTrace: Float64Array
  /** Per-pixel maximum over all frames, row-major. */
  maxProjection: Float64Array
  /** Per-pixel mean over all frames, row-major. */
  meanProjection: Float64Array
  thumbnail: Thumbnail
  /** Bytes the pass read from disk: pixel data and whatever lies between strips. */
  bytesRead: number
}

export interface Thumbnail {
  png: Buffer
  width: number
  height: number
  /** Mean-projection values mapped to black and to white (the 0.1 % and 99.9 % quantiles). */
  black: number
  white: number
}

export interface ScanOptions {
  /** The files of one stack in frame order (for a multi-file OME-TIFF, as the TiffData order gives). */
  paths: string[]
  /** Called with the fraction of frames done, at least every 1 % and once with 1 at the end. */
  onProgress?: (fraction: number) => void
  signal?: AbortSignal
}

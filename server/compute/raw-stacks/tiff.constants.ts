/**
 * Tag numbers, field types and code tables of TIFF 6.0 (Adobe, 1992) and the BigTIFF extension
 * (64-bit counts and offsets, field types 16–18). Compression codes past 32773 are the registered
 * values libraries agree on (from memory: 32946 old Deflate, 34712 JPEG 2000, 34887 LERC,
 * 34925 LZMA, 50000 Zstandard, 50001 WebP).
 */
export const TAG = {
  newSubfileType: 254,
  imageWidth: 256,
  imageLength: 257,
  bitsPerSample: 258,
  compression: 259,
  photometric: 262,
  imageDescription: 270,
  stripOffsets: 273,
  samplesPerPixel: 277,
  rowsPerStrip: 278,
  stripByteCounts: 279,
  planarConfiguration: 284,
  predictor: 317,
  tileWidth: 322,
  tileOffsets: 324,
  sampleFormat: 339,
} as const

/** Bytes per value of each field type (TIFF 6.0 section 2; BigTIFF adds 16 LONG8, 17 SLONG8, 18 IFD8). */
export const FIELD_TYPE_BYTES: Readonly<Record<number, number>> = {
  1: 1,
  2: 1,
  3: 2,
  4: 4,
  5: 8,
  6: 1,
  7: 1,
  8: 2,
  9: 4,
  10: 8,
  11: 4,
  12: 8,
  13: 4,
  16: 8,
  17: 8,
  18: 8,
}

const COMPRESSION_NAMES: Readonly<Record<number, string>> = {
  1: 'none',
  2: 'ccitt-rle',
  3: 'ccitt-t4',
  4: 'ccitt-t6',
  5: 'lzw',
  6: 'old-jpeg',
  7: 'jpeg',
  8: 'deflate',
  32773: 'packbits',
  32946: 'deflate',
  34712: 'jpeg2000',
  34887: 'lerc',
  34925: 'lzma',
  50000: 'zstd',
  50001: 'webp',
}

export function compressionName(code: number): string {
  return COMPRESSION_NAMES[code] ?? `unknown (code ${code})`
}

export type SampleFormat = 'uint' | 'int' | 'float'

/** SampleFormat 1 = unsigned, 2 = two's complement, 3 = IEEE float; 4 (undefined) reads as unsigned. */
export function sampleFormatName(code: number): SampleFormat | null {
  if (code === 1 || code === 4) return 'uint'
  if (code === 2) return 'int'
  if (code === 3) return 'float'
  return null
}

import { getDecoder } from 'geotiff'
import { RawStackError } from './raw-stack.error'
import { compressionName } from './tiff.constants'

/** Lossless codes geotiff decodes in-process and the tests cover: LZW, Deflate (both codes), PackBits. */
const DECODABLE = new Set([5, 8, 32946, 32773])

export interface StripCodec {
  /** Decoded bytes of one strip, in the file's byte order. */
  decode(compressed: Uint8Array): Promise<Buffer>
}

export function isDecodable(compressionCode: number): boolean {
  return compressionCode === 1 || DECODABLE.has(compressionCode)
}

export function unsupportedCompression(compressionCode: number, frame: number): RawStackError {
  return new RawStackError(
    'unsupported',
    `Frame ${frame} uses ${compressionName(compressionCode)} compression, which cannot be scanned ` +
      '(supported: none, LZW, Deflate, PackBits)',
  )
}

/**
 * A decoder for one compression, used with predictor 1: the predictor is undone afterwards on
 * samples in native byte order, which also serves big-endian files.
 */
export async function stripCodec(
  compressionCode: number,
  width: number,
  rowsPerStrip: number,
  bitsPerSample: number,
): Promise<StripCodec> {
  const decoder = await getDecoder(compressionCode, {
    tileWidth: width,
    tileHeight: rowsPerStrip,
    predictor: 1,
    bitsPerSample,
    planarConfiguration: 1,
  })
  return {
    async decode(compressed) {
      // A copy of exactly the strip: Buffer#slice would share (and hand over) the whole chunk.
      const own = new Uint8Array(compressed.length)
      own.set(compressed)
      const decoded = await decoder.decode(own.buffer)
      return Buffer.from(decoded)
    },
  }
}

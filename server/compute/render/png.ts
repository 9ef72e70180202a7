/** PNG encoding of an RGB image with sharp (raw input, three channels). */
import sharp from 'sharp'

/** Encodes width·height RGB pixels (3 bytes each, row-major, top row first). */
export async function encodePng(
  rgb: Uint8Array,
  width: number,
  height: number,
  compressionLevel = 6,
): Promise<Buffer> {
  if (rgb.length !== width * height * 3) {
    throw new RangeError(`RGB data holds ${rgb.length} bytes, not ${width}·${height}·3`)
  }
  const raw = Buffer.from(rgb.buffer, rgb.byteOffset, rgb.byteLength)
  return sharp(raw, { raw: { width, height, channels: 3 } })
    .png({ compressionLevel })
    .toBuffer()
}

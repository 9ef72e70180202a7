import { open } from 'node:fs/promises'

export type TiffKind = 'classic' | 'bigtiff'

export interface TiffFileHeader {
  kind: TiffKind
  littleEndian: boolean
  /** 8 for classic TIFF, 16 for BigTIFF. */
  headerBytes: number
  firstIfdOffset: number
}

/** The largest header this module reads: BigTIFF's 16 bytes. */
export const HEADER_PROBE_BYTES = 16

/**
 * Classic TIFF starts "II" 42 or "MM" 42 with a 32-bit offset (TIFF 6.0 section 2); BigTIFF
 * starts "II" 43 or "MM" 43, then the offset byte size (always 8), a zero, and a 64-bit offset.
 */
export function parseTiffHeader(bytes: Uint8Array): TiffFileHeader | null {
  if (bytes.length < 8) return null
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  const order = String.fromCharCode(bytes[0]!, bytes[1]!)
  if (order !== 'II' && order !== 'MM') return null
  const littleEndian = order === 'II'
  const version = view.getUint16(2, littleEndian)
  if (version === 42) {
    return {
      kind: 'classic',
      littleEndian,
      headerBytes: 8,
      firstIfdOffset: view.getUint32(4, littleEndian),
    }
  }
  if (version !== 43 || bytes.length < HEADER_PROBE_BYTES) return null
  if (view.getUint16(4, littleEndian) !== 8 || view.getUint16(6, littleEndian) !== 0) return null
  const offset = view.getBigUint64(8, littleEndian)
  if (offset > BigInt(Number.MAX_SAFE_INTEGER)) return null
  return { kind: 'bigtiff', littleEndian, headerBytes: 16, firstIfdOffset: Number(offset) }
}

/** The kind of TIFF from the first bytes (e.g. the first chunk of an upload), or null. */
export function detectTiffBytes(bytes: Uint8Array): TiffKind | null {
  return parseTiffHeader(bytes)?.kind ?? null
}

/** The kind of TIFF a file is, judged by its content and never by its name. */
export async function detectTiff(path: string): Promise<TiffKind | null> {
  const handle = await open(path, 'r')
  try {
    const probe = new Uint8Array(HEADER_PROBE_BYTES)
    const { bytesRead } = await handle.read(probe, 0, HEADER_PROBE_BYTES, 0)
    return detectTiffBytes(probe.subarray(0, bytesRead))
  } finally {
    await handle.close()
  }
}

import { writeFile } from 'node:fs/promises'
import type { JobWork } from '../../jobs/job-protocol'
import { readStackHeader, resolveOmeFileSet, scanStack } from './raw-stacks'

export interface RawStackReport {
  format: string
  byteOrder: string
  width: number
  height: number
  frames: number
  bitsPerSample: number
  sampleFormat: string
  compression: string
  omeXml: string | null
  /** For a multi-file OME-TIFF: the files its OME-XML names. */
  fileSet: string[]
  trace: { min: number; max: number; mean: number }
  thumbnail: { width: number; height: number }
}

/**
 * Header, then one streaming pass over every frame: per-frame mean trace and a projection
 * thumbnail, written next to the file. Runs in a worker thread.
 */
export const scanRawStackWork: JobWork = async (payload, progress) => {
  const source = String(payload.source)
  const header = await readStackHeader(source)
  progress(0.02, 'header read')
  const fileSet = header.omeXml ? fileNamesOf(header.omeXml) : []
  const scan = await scanStack({ paths: [source], onProgress: (f) => progress(0.02 + 0.96 * f, 'reading frames') })
  await writeFile(String(payload.thumbnail), scan.thumbnail.png)
  await writeFile(String(payload.trace), JSON.stringify(Array.from(scan.meanTrace, (v) => Math.round(v * 1000) / 1000)))
  let min = Infinity
  let max = -Infinity
  let sum = 0
  for (const v of scan.meanTrace) {
    min = Math.min(min, v)
    max = Math.max(max, v)
    sum += v
  }
  const report: RawStackReport = {
    format: header.format,
    byteOrder: header.byteOrder,
    width: header.width,
    height: header.height,
    frames: scan.frames,
    bitsPerSample: header.bitsPerSample,
    sampleFormat: header.sampleFormat,
    compression: header.compression,
    omeXml: header.omeXml,
    fileSet,
    trace: { min, max, mean: scan.frames ? sum / scan.frames : 0 },
    thumbnail: { width: scan.thumbnail.width, height: scan.thumbnail.height },
  }
  return report
}

function fileNamesOf(omeXml: string): string[] {
  try {
    const set = resolveOmeFileSet(omeXml)
    return [...new Set(set.files.map((f) => f.fileName).filter((n): n is string => Boolean(n)))]
  } catch {
    return []
  }
}

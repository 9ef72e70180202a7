import { createHash } from 'node:crypto'
import { writeFile } from 'node:fs/promises'
import type { JobWork } from '../../jobs/job-protocol'
import { derivedPaths, localOriginalOf, rawStackKeysOf, scanRawStackJob } from './file-job-kinds'
import { readStackHeader, resolveOmeFileSet, scanStack } from '../../compute/raw-stacks'

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
export const scanRawStackWork: JobWork = async (input, { storage, progress }) => {
  const payload = scanRawStackJob.payload.parse(input)
  // Local copies (S3 profile): the header walk seeks all over the file.
  const source = await localOriginalOf(storage, payload.sourceKey)
  const out = derivedPaths(storage, payload.fileId)
  // A multi-file OME-TIFF is scanned over all its parts, in plane order, once they have all arrived.
  const paths = []
  for (const key of payload.partKeys ?? []) paths.push(await localOriginalOf(storage, key))
  if (!paths.length) paths.push(source)
  const header = await readStackHeader(source)
  progress(0.02, 'header read')
  const fileSet = header.omeXml ? fileNamesOf(header.omeXml) : []
  const scan = await scanStack({
    paths,
    onProgress: (f) => progress(0.02 + 0.96 * f, 'reading frames'),
  })
  const trace = JSON.stringify(Array.from(scan.meanTrace, (v) => Math.round(v * 1000) / 1000))
  await writeFile(out.thumbnail, scan.thumbnail.png)
  await writeFile(out.trace, trace)
  // For every node (S3 profile), with their SHA-256: both are in memory, hashing is cheap.
  if (storage.mirror.mirrored) {
    const keys = rawStackKeysOf(storage, payload.fileId)
    await storage.mirror.publish(keys.thumbnail, { sha256: sha256Of(scan.thumbnail.png) })
    await storage.mirror.publish(keys.trace, { sha256: sha256Of(trace) })
  }
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
  return { ...report, derivedBytes: await storage.derivedBytes(payload.fileId) }
}

const sha256Of = (bytes: Uint8Array | string) => createHash('sha256').update(bytes).digest('hex')

/** The files a multi-file OME-TIFF's OME-XML names, in the order of their first planes. */
function fileNamesOf(omeXml: string): string[] {
  try {
    const files = [...resolveOmeFileSet(omeXml).files].sort(
      (a, b) => (a.ranges[0]?.firstPlane ?? 0) - (b.ranges[0]?.firstPlane ?? 0),
    )
    return [...new Set(files.map((f) => f.fileName).filter((n): n is string => Boolean(n)))]
  } catch {
    return []
  }
}

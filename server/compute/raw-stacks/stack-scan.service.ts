import { scanFile } from './file.scanner'
import { ProjectionAccumulator } from './projection.accumulator'
import { RawStackError } from './raw-stack.error'
import type { ScanOptions, StackScan } from './raw-stack.types'
import { type OpenStack, openStack } from './stack-header.service'
import { frameLayoutOf } from './stack-layout'
import { sampleTypeOf } from './strip-samples.decoder'
import { renderThumbnail } from './thumbnail.renderer'

/** Progress is reported whenever it has moved by this fraction (the brief of callers: ≤ 2 %). */
const PROGRESS_STEP = 0.01

function progressReporter(total: number, onProgress?: (fraction: number) => void) {
  let reported = 0
  return (frame: number) => {
    const fraction = (frame + 1) / total
    if (onProgress && (fraction - reported >= PROGRESS_STEP || fraction === 1)) {
      reported = fraction
      onProgress(fraction)
    }
  }
}

async function openAll(paths: string[], signal?: AbortSignal): Promise<OpenStack[]> {
  const stacks: OpenStack[] = []
  try {
    for (const path of paths) stacks.push(await openStack(path, signal))
    return stacks
  } catch (error) {
    for (const stack of stacks) stack.file.close()
    throw error
  }
}

/**
 * One streaming pass over every frame of a stack (one or several files, in the order given):
 * the mean of each frame, the per-pixel maximum and mean, and a contrast-stretched thumbnail.
 * All headers are read and checked before any pixel is; memory holds the projections and one
 * read chunk, never the stack.
 */
export async function scanStack({ paths, onProgress, signal }: ScanOptions): Promise<StackScan> {
  if (paths.length === 0) throw new RawStackError('malformed', 'No files to scan')
  const stacks = await openAll(paths, signal)
  try {
    const layout = frameLayoutOf(stacks)
    const frames = stacks.reduce((sum, stack) => sum + stack.directories.length, 0)
    const samples = sampleTypeOf(layout.format, layout.bitsPerSample, true, 0)
    const accumulator = new ProjectionAccumulator(layout.width * layout.height, frames, samples)
    const context = { accumulator, layout, frameDone: progressReporter(frames, onProgress), signal }
    let nextFrame = 0
    let bytesRead = 0
    for (const [i, stack] of stacks.entries()) {
      const done = await scanFile(stack, paths[i]!, nextFrame, context)
      nextFrame = done.nextFrame
      bytesRead += done.bytesRead
    }
    const meanProjection = accumulator.meanProjection(frames)
    return {
      frames,
      width: layout.width,
      height: layout.height,
      meanTrace: accumulator.meanTrace,
      maxProjection: accumulator.maxProjection(),
      meanProjection,
      thumbnail: await renderThumbnail(meanProjection, layout.width, layout.height),
      bytesRead,
    }
  } finally {
    for (const stack of stacks) stack.file.close()
  }
}

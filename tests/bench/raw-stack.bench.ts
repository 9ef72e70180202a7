/**
 * Raw camera stacks: a ~1 GB classic TIFF of 2000 frames of 512×512 uint16 and a BigTIFF chain
 * of 50 000 small frames. Measures readStackHeader (and geotiff's page count on the same files,
 * the alternative that was weighed) and one scanStack pass. The files are read right after
 * they are written (and synced), so they come from the page cache: these are CPU-bound figures.
 * RAW_STACK_FRAMES overrides the 2000 frames.
 */
import { closeSync, fsyncSync, mkdtempSync, openSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fromFile } from 'geotiff'
import { readStackHeader, scanStack } from '@server/compute/raw-stacks'
import { writeTiffStack } from '../fixtures/tiff-writer'

const SIDE = 512
const FRAMES = Number(process.env.RAW_STACK_FRAMES ?? 2000)
const CHAIN_FRAMES = 50_000
const MiB = 2 ** 20

const round = (value: number, digits = 1) => Number(value.toFixed(digits))

async function medianMs(runs: number, task: () => Promise<unknown>): Promise<number> {
  const times: number[] = []
  for (let i = 0; i < runs; i++) {
    const start = performance.now()
    await task()
    times.push(performance.now() - start)
  }
  return round(times.sort((a, b) => a - b)[Math.floor(runs / 2)]!, 2)
}

/** Waits for the written file to reach the disk, so write-back does not compete with the reads. */
function settle(path: string) {
  const fd = openSync(path, 'r')
  fsyncSync(fd)
  closeSync(fd)
}

async function geotiffPageCount(path: string) {
  return (await fromFile(path)).getImageCount()
}

/** A camera-like frame: an offset, a fixed pattern and a drifting bright spot. */
function cameraFrame(into: Uint16Array, frame: number): Uint16Array {
  const spotX = (frame * 3) % SIDE
  for (let y = 0, i = 0; y < SIDE; y++) {
    for (let x = 0; x < SIDE; x++, i++) {
      const near = Math.abs(x - spotX) < 3 && Math.abs(y - 256) < 3
      into[i] = 100 + ((x * 7 + y * 13) & 63) + (near ? 2000 : 0)
    }
  }
  return into
}

async function benchBigStack(dir: string) {
  const path = join(dir, 'stack.tif')
  const scratch = new Uint16Array(SIDE * SIDE)
  const writeStart = performance.now()
  const written = writeTiffStack(path, {
    width: SIDE,
    height: SIDE,
    frames: FRAMES,
    pixels: (frame) => cameraFrame(scratch, frame),
  })
  settle(path)
  const writeS = (performance.now() - writeStart) / 1000
  const headerMs = await medianMs(5, () => readStackHeader(path))
  const geotiffHeaderMs = await medianMs(3, () => geotiffPageCount(path))
  let peakRss = process.memoryUsage().rss
  const rssBefore = peakRss
  const scanStart = performance.now()
  const scan = await scanStack({
    paths: [path],
    onProgress: () => (peakRss = Math.max(peakRss, process.memoryUsage().rss)),
  })
  const scanS = (performance.now() - scanStart) / 1000
  if (scan.frames !== FRAMES || scan.meanTrace.length !== FRAMES)
    throw new Error('scan lost frames')
  return {
    stackMB: round(written.bytes / 1e6),
    writeS: round(writeS, 2),
    headerMs,
    geotiffHeaderMs,
    scanS: round(scanS, 2),
    scanMBps: round(written.bytes / 1e6 / scanS),
    scanNsPerPixel: round((scanS * 1e9) / (FRAMES * SIDE * SIDE), 2),
    scanRssGrowthMiB: round((peakRss - rssBefore) / MiB),
    thumbnail: `${scan.thumbnail.width}×${scan.thumbnail.height}, ${scan.thumbnail.png.length} B`,
  }
}

async function benchLongChain(dir: string) {
  const path = join(dir, 'chain.tif')
  const frame = new Uint16Array(16 * 16)
  writeTiffStack(path, {
    width: 16,
    height: 16,
    frames: CHAIN_FRAMES,
    kind: 'bigtiff',
    pixels: () => frame,
  })
  const header = await readStackHeader(path)
  if (header.frames !== CHAIN_FRAMES) throw new Error('header lost frames')
  return {
    chainFrames: CHAIN_FRAMES,
    chainHeaderMs: await medianMs(5, () => readStackHeader(path)),
    chainGeotiffMs: await medianMs(3, () => geotiffPageCount(path)),
  }
}

export async function benchRawStack() {
  const dir = mkdtempSync(join(tmpdir(), 'raw-stack-bench-'))
  try {
    return {
      frames: FRAMES,
      side: SIDE,
      ...(await benchBigStack(dir)),
      ...(await benchLongChain(dir)),
    }
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs'
import { dirname } from 'node:path'
import {
  referenceScale,
  renderTilePng,
  sharedOverview,
  type Overview,
  type ScaleTask,
  type TileTask,
} from '../../compute/preview'
import type { TilePyramid } from '../../compute/render'

/** A tile and where its PNG is kept once drawn (one file per tile, options and brightness). */
export interface CachedTileTask extends TileTask {
  cachePath: string
}

/** A table's overview for every thread (see sharedOverview). */
export interface OverviewTask {
  arrowPath: string
  pyramid: TilePyramid
}

export type TileWorkerTask =
  | ({ kind: 'tile' } & CachedTileTask)
  | ({ kind: 'scale' } & ScaleTask)
  | ({ kind: 'overview' } & OverviewTask)
  | { kind: 'warm' }

/** A tile-pool thread's one entry (Piscina calls the default export with each task). */
export default async function run(
  task: TileWorkerTask,
): Promise<Uint8Array | number | Overview | null> {
  switch (task.kind) {
    case 'warm':
      return null
    case 'tile':
      return cachedTile(task)
    case 'scale':
      return referenceScale(task)
    case 'overview':
      return sharedOverview(task.arrowPath, task.pyramid)
  }
}

/**
 * The kept PNG, or a fresh render that is then kept. Synchronous file calls: this thread has
 * nothing else to do meanwhile, and they skip the round trip through libuv's thread pool.
 */
async function cachedTile({ cachePath, ...task }: CachedTileTask): Promise<Uint8Array> {
  // Asked first, without an exception: most tiles of a new view are not drawn yet, and an error
  // object (with its stack) per tile is garbage the collector then has to clear.
  if (statSync(cachePath, { throwIfNoEntry: false })) {
    try {
      return readFileSync(cachePath)
    } catch {
      // Gone meanwhile (the table was read again) or unreadable: draw it.
    }
  }
  const png = await renderTilePng(task)
  try {
    writeAtomically(cachePath, png)
  } catch {
    // A tile that could not be kept is drawn again next time; the answer is not lost.
  }
  return png
}

/** Readers never see half a PNG: written beside, then renamed over. */
function writeAtomically(path: string, bytes: Uint8Array) {
  const temporary = `${path}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`
  try {
    writeFileSync(temporary, bytes)
  } catch (error) {
    // The folder exists for all but a view's first tile: create it only when missing.
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error
    mkdirSync(dirname(path), { recursive: true })
    writeFileSync(temporary, bytes)
  }
  renameSync(temporary, path)
}

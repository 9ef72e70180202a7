import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs'
import { dirname } from 'node:path'
import {
  referenceScale,
  renderTile,
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

/**
 * Tiles drawn from fewer localizations than this are not kept on disk: such a tile (most of the
 * deep levels of a large table) draws again in about a millisecond, and creating its file took
 * half that again on this kind of machine (≈0.5 ms of system time a tile, measured with the tiles
 * bench), while only a few are ever asked twice past the browser's own cache. Coarse tiles, which
 * every visitor of a table opens and which read many rows, are kept.
 */
export const KEEP_FROM_LOCALIZATIONS = 20_000

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
 * The kept PNG, or a fresh render, kept when it drew many localizations. Synchronous file calls:
 * this thread has nothing else to do meanwhile, and they skip the round trip through libuv's
 * thread pool.
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
  const { png, localizations } = await renderTile(task)
  if (localizations < KEEP_FROM_LOCALIZATIONS) return png
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

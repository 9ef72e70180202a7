import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs'
import { dirname } from 'node:path'
import { referenceScale, renderTilePng, type ScaleTask, type TileTask } from '../../compute/preview'

/** A tile and where its PNG is kept once drawn (one file per tile, options and brightness). */
export interface CachedTileTask extends TileTask {
  cachePath: string
}

export type TileWorkerTask =
  ({ kind: 'tile' } & CachedTileTask) | ({ kind: 'scale' } & ScaleTask) | { kind: 'warm' }

/** A tile-pool thread's one entry (Piscina calls the default export with each task). */
export default async function run(task: TileWorkerTask): Promise<Uint8Array | number | null> {
  if (task.kind === 'warm') return null
  return task.kind === 'tile' ? cachedTile(task) : referenceScale(task)
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

import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import { poolEntry } from '../../threads'
import type { CachedTileTask, TileWorkerTask } from './tile.worker'

/**
 * Tiles are rendered off the request thread, by a small pool of threads (one per core, at most
 * two here), so a burst of tile requests never stalls the API.
 */
export class TilePool {
  private readonly pool = new Piscina({
    ...poolEntry(new URL('./tile.worker.ts', import.meta.url)),
    minThreads: 0,
    maxThreads: Math.max(1, Math.min(2, availableParallelism())),
    idleTimeout: 60_000,
  })

  private warmed = false

  /** The tile's PNG, from its cache file or drawn now (and then kept there). */
  tile(task: CachedTileTask): Promise<Uint8Array> {
    return this.pool.run({ kind: 'tile', ...task }) as Promise<Uint8Array>
  }

  scale(task: Omit<Extract<TileWorkerTask, { kind: 'scale' }>, 'kind'>): Promise<number | null> {
    return this.pool.run({ kind: 'scale', ...task }) as Promise<number | null>
  }

  /**
   * Starts the threads (each loads the render modules, a few seconds under tsx) when a preview is
   * about to be looked at, so its first tiles do not wait for that.
   */
  warm(): void {
    if (this.warmed) return
    this.warmed = true
    for (let i = 0; i < this.pool.options.maxThreads; i++)
      void this.pool.run({ kind: 'warm' }).catch(() => (this.warmed = false))
  }

  close(): Promise<void> {
    return this.pool.destroy()
  }
}

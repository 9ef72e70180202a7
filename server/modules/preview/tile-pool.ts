import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import { ServiceUnavailableError } from '../../errors/http-error'
import { poolEntry } from '../../threads'
import type { Overview } from '../../compute/preview'
import type { CachedTileTask, OverviewTask, TileWorkerTask } from './tile.worker'

export interface TilePoolOptions {
  /** The thread entry (tests give their own). */
  entry?: URL
  /**
   * A task still running after this long is given up and its thread replaced: whatever held it
   * (a pathological view, a disk that stopped answering), the pool keeps serving other tiles.
   */
  taskTimeoutMs?: number
}

/** Far beyond any tile (a level-0 render of 10 million rows takes about a second). */
const TASK_TIMEOUT_MS = 30_000

/**
 * Tiles are rendered off the request thread, by a small pool of threads (one per core, at most
 * two here), so a burst of tile requests never stalls the API.
 */
export class TilePool {
  private readonly pool: Piscina
  private readonly taskTimeoutMs: number
  private warmed = false

  constructor(options: TilePoolOptions = {}) {
    this.taskTimeoutMs = options.taskTimeoutMs ?? TASK_TIMEOUT_MS
    this.pool = new Piscina({
      ...poolEntry(options.entry ?? new URL('./tile.worker.ts', import.meta.url)),
      minThreads: 0,
      maxThreads: Math.max(1, Math.min(2, availableParallelism())),
      idleTimeout: 60_000,
    })
  }

  /** The tile's PNG, from its cache file or drawn now (and then kept there). */
  tile(task: CachedTileTask): Promise<Uint8Array> {
    return this.run({ kind: 'tile', ...task }) as Promise<Uint8Array>
  }

  scale(task: Omit<Extract<TileWorkerTask, { kind: 'scale' }>, 'kind'>): Promise<number | null> {
    return this.run({ kind: 'scale', ...task }) as Promise<number | null>
  }

  /** A table's overview, in memory every thread of the pool reads (a SharedArrayBuffer). */
  overview(task: OverviewTask): Promise<Overview> {
    return this.run({ kind: 'overview', ...task }) as Promise<Overview>
  }

  /** Aborting a running task ends its thread. */
  private async run(task: TileWorkerTask): Promise<unknown> {
    try {
      return await this.pool.run(task, { signal: AbortSignal.timeout(this.taskTimeoutMs) })
    } catch (error) {
      if ((error as Error).name !== 'AbortError') throw error
      // The aborted thread is gone, and with no minimum of threads Piscina starts no other for
      // the tiles already waiting: a task of our own makes it start one.
      void this.pool.run({ kind: 'warm' }).catch(() => {})
      throw new ServiceUnavailableError(
        `The preview could not be drawn within ${this.taskTimeoutMs / 1000} s; please try again.`,
      )
    }
  }

  /**
   * Starts the threads (each loads the render modules) when a preview is about to be looked at,
   * so its first tiles do not wait for that.
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

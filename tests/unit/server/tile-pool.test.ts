// @vitest-environment node
/**
 * A tile that never finishes must not take the preview down with it: the pool gives it up after
 * its time limit (503 in words), replaces the thread, and goes on drawing the others.
 */
import { afterAll, describe, expect, it } from 'vitest'
import { TilePool } from '@server/modules/preview/tile-pool'
import type { CachedTileTask } from '@server/modules/preview/tile.worker'

const pool = new TilePool({
  entry: new URL('../../fixtures/stuck-tile.worker.ts', import.meta.url),
  taskTimeoutMs: 1500,
})
afterAll(() => pool.close())

const task = (cachePath: string) => ({ cachePath }) as CachedTileTask

describe('the tile pool', () => {
  it('gives up a tile that never finishes, and keeps drawing others', async () => {
    // As many stuck tiles as the pool has threads: without the limit nothing else would run.
    const stuck = [pool.tile(task('stuck')), pool.tile(task('stuck'))]
    // Queued behind them (its own limit runs out after theirs): drawn once they are given up.
    await new Promise((resolve) => setTimeout(resolve, 1000))
    const after = pool.tile(task('fine'))
    for (const s of stuck)
      await expect(s).rejects.toMatchObject({
        status: 503,
        message: expect.stringMatching(/could not be drawn within 1\.5 s/),
      })
    expect([...(await after)]).toEqual([137, 80, 78, 71])
    expect([...(await pool.tile(task('fine')))]).toEqual([137, 80, 78, 71])
  }, 20_000)
})

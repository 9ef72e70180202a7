import { describe, expect, it } from 'vitest'
import { ResultCache } from '@server/modules/datasets/result-cache'

const ids = (n: number) => Int32Array.from({ length: n }, (_, i) => i + 1)

describe('the dataset list result cache', () => {
  it('gives a result back only for the access version it was read in', () => {
    const cache = new ResultCache(100)
    cache.set('a', 7, ids(3))
    expect(Array.from(cache.get('a', 7)!)).toEqual([1, 2, 3])
    expect(cache.get('a', 8)).toBeUndefined()
    expect(cache.get('a', 7)).toBeUndefined() // a stale entry is dropped, not kept
    expect(cache.size).toBe(0)
  })

  it('holds at most its budget of ids, dropping the least recently used results first', () => {
    const cache = new ResultCache(100)
    cache.set('a', 1, ids(40))
    cache.set('b', 1, ids(40))
    cache.get('a', 1) // b is now the least recently used
    cache.set('c', 1, ids(40))
    expect(cache.get('b', 1)).toBeUndefined()
    expect(cache.get('a', 1)).toHaveLength(40)
    expect(cache.get('c', 1)).toHaveLength(40)
    expect(cache.size).toBe(80)
  })

  it('keeps a single result larger than the budget until the next one comes', () => {
    const cache = new ResultCache(10)
    cache.set('big', 1, ids(50))
    expect(cache.get('big', 1)).toHaveLength(50)
    cache.set('small', 1, ids(5))
    expect(cache.get('big', 1)).toBeUndefined()
    expect(cache.size).toBe(5)
  })
})

import { describe, expect, it } from 'vitest'
import { VersionedCache } from '@server/http/versioned-cache'

describe('VersionedCache', () => {
  it('serves an entry only for the version it was stored under', () => {
    const cache = new VersionedCache<string>(10)
    cache.set('k', 3, 'v3')
    expect(cache.get('k', 3)).toBe('v3')
    expect(cache.get('k', 4)).toBeUndefined()
    expect(cache.get('k', 3)).toBeUndefined()
  })

  it('evicts the least recently used entry past its capacity', () => {
    const cache = new VersionedCache<number>(2)
    cache.set('a', 1, 1)
    cache.set('b', 1, 2)
    cache.get('a', 1)
    cache.set('c', 1, 3)
    expect(cache.get('b', 1)).toBeUndefined()
    expect(cache.get('a', 1)).toBe(1)
    expect(cache.size).toBe(2)
  })
})

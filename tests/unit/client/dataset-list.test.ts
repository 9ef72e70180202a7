import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope, nextTick } from 'vue'
import { listDatasets } from '@/api/datasets'
import { useDatasetList } from '@/composables/useDatasetList'
import { listStartFrom } from '@/composables/useListQuery'

vi.mock('@/api/datasets', () => ({ listDatasets: vi.fn() }))
const listMock = vi.mocked(listDatasets)
const lastQuery = () => listMock.mock.calls.at(-1)?.[0]

beforeEach(() => {
  vi.useFakeTimers()
  listMock.mockReset()
  listMock.mockResolvedValue({ items: [], total: 0 })
})
afterEach(() => vi.useRealTimers())

describe('useDatasetList', () => {
  it('asks the server for the page, sort and filters the table shows', async () => {
    const scope = effectScope()
    const list = scope.run(() => useDatasetList({ projectId: 7 }))!
    expect(lastQuery()).toEqual({ limit: 25, offset: 0, sort: '-updatedAt', projectId: 7 })

    list.page.value = 3
    list.sortBy.value = [{ key: 'title', order: 'asc' }]
    await nextTick()
    expect(lastQuery()).toMatchObject({ offset: 50, sort: 'title', projectId: 7 })
    scope.stop()
  })

  it('waits for typing to pause before searching, and starts again from the first page', async () => {
    const scope = effectScope()
    const list = scope.run(() => useDatasetList({ start: { page: 2 } }))!
    list.search.value = 'd'
    list.search.value = 'dstorm'
    await nextTick()
    const before = listMock.mock.calls.length

    await vi.advanceTimersByTimeAsync(400)
    expect(listMock.mock.calls.length).toBe(before + 1)
    expect(lastQuery()).toMatchObject({ q: 'dstorm', offset: 0 })
    scope.stop()
  })

  it('reads where to start from the page address, ignoring what it cannot use', () => {
    expect(listStartFrom({ q: 'pores', state: 'submitted', projectId: '4', page: '2' })).toEqual({
      search: 'pores',
      state: 'submitted',
      projectId: 4,
      page: 2,
    })
    expect(listStartFrom({ state: 'lost', projectId: '-1', page: 'x' })).toEqual({
      search: '',
      state: null,
      projectId: null,
      page: 1,
    })
  })
})

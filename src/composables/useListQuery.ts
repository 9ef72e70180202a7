import { watch } from 'vue'
import { useRouter, type LocationQuery } from 'vue-router'
import { DATASET_STATES, type DatasetState } from '@shared/domain/dataset-state'
import type { DatasetListStart, useDatasetList } from './useDatasetList'

type DatasetList = ReturnType<typeof useDatasetList>
type QueryValue = LocationQuery[string] | undefined

const text = (value: QueryValue): string =>
  typeof value === 'string' ? value : Array.isArray(value) && value[0] ? value[0] : ''
const positive = (value: QueryValue): number | null => {
  const n = Number(text(value))
  return Number.isInteger(n) && n > 0 ? n : null
}
const stateOf = (value: QueryValue): DatasetState | null =>
  DATASET_STATES.find((s) => s === text(value)) ?? null

/** The list a page address asks for (`?q=&state=&projectId=&page=`). */
export function listStartFrom(query: LocationQuery): DatasetListStart {
  return {
    search: text(query.q),
    state: stateOf(query.state),
    projectId: positive(query.projectId),
    page: positive(query.page) ?? 1,
  }
}

/**
 * Keeps the list's search, filters and page in the address, so a link or the back button brings
 * the same list again. Start the list from `listStartFrom(route.query)`.
 */
export function useListQuery(list: DatasetList): void {
  const router = useRouter()
  watch(
    [list.search, list.state, list.projectId, list.page],
    ([search, state, projectId, page]) => {
      const query: Record<string, string> = {}
      if (search.trim()) query.q = search.trim()
      if (state) query.state = state
      if (projectId) query.projectId = String(projectId)
      if (page > 1) query.page = String(page)
      void router.replace({ query })
    },
  )
}

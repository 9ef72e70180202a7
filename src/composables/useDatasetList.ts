import { computed, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import type { DatasetState } from '@shared/domain/dataset-state'
import { DATASET_SORT_FIELDS } from '@shared/schemas/dataset.schema'
import { listDatasets, type DatasetSort } from '@/api/datasets'
import { useAsync } from './useAsync'
import { useDebounced } from './useDebounced'

export interface SortItem {
  key: string
  order?: boolean | 'asc' | 'desc'
}

function toSort(sortBy: SortItem[]): DatasetSort {
  const first = sortBy[0]
  // Only columns the server can sort by; anything else falls back to the newest changes.
  const key = DATASET_SORT_FIELDS.find((f) => f === first?.key)
  if (!first || !key) return '-updatedAt'
  return first.order === 'desc' ? `-${key}` : key
}

/** Where a list starts: from the page address, or the defaults. */
export interface DatasetListStart {
  search?: string
  state?: DatasetState | null
  projectId?: number | null
  page?: number
  itemsPerPage?: number
}

export interface DatasetListOptions {
  /** Pins the list to one project (the project page). */
  projectId?: MaybeRefOrGetter<number | undefined>
  start?: DatasetListStart
}

/** One page of datasets from the server, following the table's paging, sorting and filters. */
export function useDatasetList(options: DatasetListOptions = {}) {
  const fixedProjectId = options.projectId
  const start = options.start ?? {}
  const page = ref(start.page ?? 1)
  const itemsPerPage = ref(start.itemsPerPage ?? 25)
  const sortBy = ref<SortItem[]>([{ key: 'updatedAt', order: 'desc' }])
  const search = ref(start.search ?? '')
  const state = ref<DatasetState | null>(start.state ?? null)
  const projectId = ref<number | null>(start.projectId ?? null)
  const q = useDebounced(search, 350)

  const list = useAsync(listDatasets)
  const items = computed(() => list.data.value?.items ?? [])
  const total = computed(() => list.data.value?.total ?? 0)
  const filtered = computed(() => Boolean(q.value.trim() || state.value || projectId.value))

  function load() {
    const perPage = itemsPerPage.value > 0 ? itemsPerPage.value : 200
    return list.run({
      limit: Math.min(perPage, 200),
      offset: (page.value - 1) * perPage,
      sort: toSort(sortBy.value),
      q: q.value.trim() || undefined,
      state: state.value ?? undefined,
      projectId: toValue(fixedProjectId) ?? projectId.value ?? undefined,
    })
  }

  // A new filter starts again from the first page.
  watch([q, state, projectId, () => toValue(fixedProjectId)], () => {
    if (page.value !== 1) page.value = 1
    else void load()
  })
  watch([page, itemsPerPage, sortBy], () => void load(), { deep: true, immediate: true })

  return {
    page,
    itemsPerPage,
    sortBy,
    search,
    state,
    projectId,
    items,
    total,
    filtered,
    loading: list.loading,
    error: list.error,
    reload: load,
  }
}

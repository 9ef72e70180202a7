import { computed, reactive, ref, watch } from 'vue'
import type {
  FrcRangeKey,
  PublicSearchSort,
  SearchFacet,
} from '@shared/schemas/public-search.schema'
import { searchPublicDatasets } from '@/api/search'
import { useAsync } from './useAsync'
import type { SortItem } from './useDatasetList'
import { useDebounced } from './useDebounced'

/** Table columns the server sorts by, and the sort each means. */
const COLUMN_SORTS: Record<string, PublicSearchSort> = { accession: 'accession', title: 'title' }

/** What a search starts from: its words and chosen facets (from the page's address). */
export interface SearchStart {
  q?: string
  facets?: Partial<Record<SearchFacet, string>>
}

/** The public search page's state: words, chosen facets, sort and paging, one request each change. */
export function usePublicSearch(start: SearchStart = {}) {
  const search = ref(start.q ?? '')
  const chosen = reactive<Partial<Record<SearchFacet, string>>>({ ...start.facets })
  const sort = ref<PublicSearchSort | null>(null)
  const sortBy = ref<SortItem[]>([])
  const page = ref(1)
  const itemsPerPage = ref(25)
  const q = useDebounced(search, 350)
  const result = useAsync(searchPublicDatasets)

  const effectiveSort = computed<PublicSearchSort | undefined>(() => {
    const column = sortBy.value[0]?.key
    return (column && COLUMN_SORTS[column]) || sort.value || undefined
  })

  function load() {
    const perPage = itemsPerPage.value > 0 ? itemsPerPage.value : 100
    const { year, frcRange, ...facets } = chosen
    return result.run({
      q: q.value.trim() || undefined,
      sort: effectiveSort.value,
      limit: Math.min(perPage, 100),
      offset: (page.value - 1) * perPage,
      ...facets,
      ...(year ? { year: Number(year) } : {}),
      ...(frcRange ? { frcRange: frcRange as FrcRangeKey } : {}),
    })
  }

  function toggle(facet: SearchFacet, value: string) {
    chosen[facet] = chosen[facet] === value ? undefined : value
  }

  watch([q, () => ({ ...chosen }), sort], () => {
    if (page.value !== 1) page.value = 1
    else void load()
  })
  watch([page, itemsPerPage, sortBy], () => void load(), { deep: true, immediate: true })

  return {
    search,
    chosen,
    sort,
    sortBy,
    page,
    itemsPerPage,
    toggle,
    items: computed(() => result.data.value?.items ?? []),
    total: computed(() => result.data.value?.total ?? 0),
    facets: computed(() => result.data.value?.facets),
    loading: result.loading,
    error: result.error,
    reload: load,
  }
}

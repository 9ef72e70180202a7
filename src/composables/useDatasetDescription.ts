import { computed, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { exportUrl, getMetadata, getMethodsText } from '@/api/metadata'
import { useAsync } from './useAsync'

export interface ExportLink {
  label: string
  href: string
  /** Downloaded as a file rather than opened. */
  download: boolean
}

/** A dataset's description at a glance: completeness, its gaps and the exports. */
export function useDatasetDescription(datasetId: MaybeRefOrGetter<number | null>) {
  const state = useAsync((id: number) => getMetadata(id))
  const reload = () => {
    const id = toValue(datasetId)
    if (id !== null) void state.run(id)
  }
  watch(() => toValue(datasetId), reload, { immediate: true })

  const exports = computed<ExportLink[]>(() => {
    const id = toValue(datasetId)
    if (id === null) return []
    return [
      { label: 'OME-XML', href: exportUrl(id, 'ome-xml'), download: true },
      { label: 'DataCite JSON', href: exportUrl(id, 'datacite'), download: true },
      { label: 'JSON-LD (schema.org)', href: exportUrl(id, 'jsonld'), download: false },
    ]
  })

  async function methodsText(): Promise<string> {
    const id = toValue(datasetId)
    if (id === null) throw new Error('No dataset is open')
    return getMethodsText(id)
  }

  return {
    completeness: computed(() => state.data.value?.completeness ?? null),
    metadata: computed(() => state.data.value?.metadata ?? null),
    loading: state.loading,
    error: state.error,
    reload,
    exports,
    methodsText,
  }
}

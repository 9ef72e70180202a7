import { computed, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { errorMessage } from '@/api/client'
import * as api from '@/api/files'
import type {
  ColumnMappingInput,
  TableFormatChoice,
} from '@shared/schemas/localization-mapping.schema'
import { usePolledRequest } from './usePolledRequest'

export const POLL_MS = 1_500

const anyProcessing = (answer: api.FilesAnswer | null) =>
  !!answer?.items.some((f) => f.status === 'processing')

/**
 * A dataset's files, loaded while `enabled` (the Files tab is open). While any file is being
 * processed the list is asked again every 1.5 s, so progress bars move; polling stops when none
 * is, when the tab closes and when the page goes away.
 */
export function useDatasetFiles(
  datasetId: MaybeRefOrGetter<number | null>,
  enabled: MaybeRefOrGetter<boolean>,
) {
  const request = usePolledRequest(
    () => {
      const id = toValue(datasetId)
      return id === null || !toValue(enabled) ? null : api.listFiles(id)
    },
    // A failed request keeps polling while the last answer still had files in processing.
    { everyMs: POLL_MS, again: (answer) => anyProcessing(answer) && toValue(enabled) },
  )
  const { loading, reload } = request
  const error = computed(() => (request.error.value ? errorMessage(request.error.value) : null))
  const files = computed(() => request.data.value?.items ?? [])
  /** A list has arrived: an empty `files` then means "no files", not "not asked yet". */
  const loaded = computed(() => request.data.value !== null)
  const uploadsInProgress = computed(() => request.data.value?.uploadsInProgress ?? [])
  const processing = computed(() => anyProcessing(request.data.value))

  watch([() => toValue(datasetId), () => toValue(enabled)], () => void reload(), {
    immediate: true,
  })

  const need = () => {
    const id = toValue(datasetId)
    if (id === null) throw new Error('No dataset is open')
    return id
  }

  async function remove(fileId: number) {
    await api.deleteFile(need(), fileId)
    await reload()
  }

  async function saveMapping(fileId: number, mapping: ColumnMappingInput) {
    await api.putMapping(need(), fileId, mapping)
    await reload()
  }

  async function declareFormat(fileId: number, format: TableFormatChoice) {
    await api.putFormat(need(), fileId, format)
    await reload()
  }

  return {
    files,
    loaded,
    uploadsInProgress,
    processing,
    loading,
    error,
    reload,
    remove,
    saveMapping,
    declareFormat,
    validation: (fileId: number) => api.getValidation(need(), fileId),
    frameMeans: (fileId: number) => api.getFrameMeans(need(), fileId),
  }
}

export type DatasetFiles = ReturnType<typeof useDatasetFiles>

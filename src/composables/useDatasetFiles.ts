import {
  computed,
  onScopeDispose,
  ref,
  shallowRef,
  toValue,
  watch,
  type MaybeRefOrGetter,
} from 'vue'
import { errorMessage } from '@/api/client'
import * as api from '@/api/files'
import type {
  ColumnMappingInput,
  TableFormatChoice,
} from '@shared/schemas/localization-mapping.schema'

export const POLL_MS = 1_500

/**
 * A dataset's files, loaded while `enabled` (the Files tab is open). While any file is being
 * processed the list is asked again every 1.5 s, so progress bars move; polling stops when none
 * is, when the tab closes and when the page goes away.
 */
export function useDatasetFiles(
  datasetId: MaybeRefOrGetter<number | null>,
  enabled: MaybeRefOrGetter<boolean>,
) {
  const answer = shallowRef<api.FilesAnswer | null>(null)
  const loading = ref(false)
  const error = ref<string | null>(null)
  let timer: ReturnType<typeof setTimeout> | null = null
  let latest = 0

  const files = computed(() => answer.value?.items ?? [])
  const uploadsInProgress = computed(() => answer.value?.uploadsInProgress ?? [])
  const processing = computed(() => files.value.some((f) => f.status === 'processing'))

  function stopPolling() {
    if (timer !== null) clearTimeout(timer)
    timer = null
  }

  async function reload(): Promise<void> {
    const id = toValue(datasetId)
    stopPolling()
    if (id === null || !toValue(enabled)) return
    const mine = ++latest
    loading.value = true
    try {
      const next = await api.listFiles(id)
      if (mine !== latest) return
      answer.value = next
      error.value = null
    } catch (e) {
      if (mine === latest) error.value = errorMessage(e)
    } finally {
      if (mine === latest) loading.value = false
    }
    if (mine === latest && processing.value && toValue(enabled)) {
      timer = setTimeout(() => void reload(), POLL_MS)
    }
  }

  watch([() => toValue(datasetId), () => toValue(enabled)], () => void reload(), {
    immediate: true,
  })
  onScopeDispose(() => {
    latest++
    stopPolling()
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

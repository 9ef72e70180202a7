import { computed, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { errorMessage } from '@/api/client'
import { getDatasetQuality, type DatasetQualityDto } from '@/api/quality'
import { usePolledRequest } from './usePolledRequest'

/** Reports take minutes: a slower pace than the file list's is enough to see them arrive. */
export const DATASET_QUALITY_POLL_MS = 5_000

const computing = (answer: DatasetQualityDto | null) =>
  !!answer?.items.some((i) => i.status === 'queued' || i.status === 'running')

/**
 * The quality summary of a dataset's tables, loaded while `enabled` (the Files tab is open and
 * previews may be seen). Asked again while a report is queued or computed, and whenever `changed`
 * changes (a file arrived, went or finished processing).
 */
export function useDatasetQuality(
  datasetId: MaybeRefOrGetter<number | null>,
  enabled: MaybeRefOrGetter<boolean>,
  changed: MaybeRefOrGetter<unknown> = null,
) {
  const request = usePolledRequest(
    () => {
      const id = toValue(datasetId)
      return id === null || !toValue(enabled) ? null : getDatasetQuality(id)
    },
    {
      everyMs: DATASET_QUALITY_POLL_MS,
      again: (answer, failed) => !failed && computing(answer) && toValue(enabled),
    },
  )
  watch(
    [() => toValue(datasetId), () => toValue(enabled), () => toValue(changed)],
    ([id, on], [oldId]) => {
      if (id !== oldId) request.clear()
      if (on) void request.reload()
      else request.stop()
    },
    { immediate: true },
  )

  return {
    items: computed(() => request.data.value?.items ?? []),
    /** The tables' median fitted PSF SD (nm), for the expected precision; null without one. */
    psfSigmaMedianNm: computed(() => request.data.value?.psfSigmaMedianNm ?? null),
    loaded: computed(() => request.data.value !== null),
    loading: request.loading,
    error: computed(() => (request.error.value ? errorMessage(request.error.value) : null)),
    pending: computed(() => computing(request.data.value)),
    reload: request.reload,
  }
}

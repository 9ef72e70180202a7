import { computed, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { getQuality, type DatasetRef, type QualityReportDto } from '@/api/quality'
import { usePolledRequest } from './usePolledRequest'

export const QUALITY_POLL_MS = 1_500

const computing = (r: QualityReportDto | null) => r?.status === 'queued' || r?.status === 'running'

/**
 * The quality report of one table. While the report is queued or being computed it is asked
 * again every 1.5 s, so its progress moves; asking stops when it is done or failed, when a
 * request fails, and when the page goes away.
 */
export function useQualityReport(
  datasetId: MaybeRefOrGetter<DatasetRef>,
  fileId: MaybeRefOrGetter<number>,
) {
  const request = usePolledRequest(() => getQuality(toValue(datasetId), toValue(fileId)), {
    everyMs: QUALITY_POLL_MS,
    again: (report, failed) => !failed && computing(report),
  })
  const pending = computed(() => computing(request.data.value))

  watch(
    [() => toValue(datasetId), () => toValue(fileId)],
    () => {
      request.clear()
      void request.reload()
    },
    { immediate: true },
  )

  const { data: report, error, loading, reload } = request
  return { report, error, loading, pending, reload }
}

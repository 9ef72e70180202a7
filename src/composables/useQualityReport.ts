import {
  computed,
  onScopeDispose,
  ref,
  shallowRef,
  toValue,
  watch,
  type MaybeRefOrGetter,
} from 'vue'
import { getQuality, type DatasetRef, type QualityReportDto } from '@/api/quality'

export const QUALITY_POLL_MS = 1_500

/**
 * The quality report of one table. While the report is queued or being computed it is asked
 * again every 1.5 s, so its progress moves; asking stops when it is done or failed, when a
 * request fails, and when the page goes away.
 */
export function useQualityReport(
  datasetId: MaybeRefOrGetter<DatasetRef>,
  fileId: MaybeRefOrGetter<number>,
) {
  const report = shallowRef<QualityReportDto | null>(null)
  /** The last request's failure as thrown (an ApiError carries the status). */
  const error = shallowRef<unknown>(null)
  const loading = ref(false)
  let timer: ReturnType<typeof setTimeout> | null = null
  let latest = 0

  const pending = computed(
    () => report.value?.status === 'queued' || report.value?.status === 'running',
  )

  function stop() {
    if (timer !== null) clearTimeout(timer)
    timer = null
  }

  async function reload(): Promise<void> {
    stop()
    const mine = ++latest
    loading.value = true
    try {
      const next = await getQuality(toValue(datasetId), toValue(fileId))
      if (mine !== latest) return
      report.value = next
      error.value = null
    } catch (e) {
      if (mine === latest) error.value = e
    } finally {
      if (mine === latest) loading.value = false
    }
    if (mine === latest && !error.value && pending.value)
      timer = setTimeout(() => void reload(), QUALITY_POLL_MS)
  }

  watch(
    [() => toValue(datasetId), () => toValue(fileId)],
    () => {
      report.value = null
      error.value = null
      void reload()
    },
    { immediate: true },
  )
  onScopeDispose(() => {
    latest++
    stop()
  })

  return { report, error, loading, pending, reload }
}

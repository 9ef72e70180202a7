import { computed, toValue, watch, type MaybeRefOrGetter } from 'vue'
import type { ShareDatasetInput } from '@shared/schemas/dataset.schema'
import { listShares, revokeShare, shareDataset } from '@/api/datasets'
import { useAsync } from './useAsync'

/** Who a dataset is shared with; loaded only while `enabled` (the person may share it). */
export function useDatasetShares(
  datasetId: MaybeRefOrGetter<number | null>,
  enabled: MaybeRefOrGetter<boolean>,
) {
  const list = useAsync(listShares)
  const shares = computed(() => list.data.value?.items ?? [])

  function reload() {
    const id = toValue(datasetId)
    if (id !== null && toValue(enabled)) void list.run(id)
  }
  watch([() => toValue(datasetId), () => toValue(enabled)], reload, { immediate: true })

  async function share(body: ShareDatasetInput) {
    const id = toValue(datasetId)
    if (id === null) return
    await shareDataset(id, body)
    reload()
  }

  async function revoke(shareId: number) {
    const id = toValue(datasetId)
    if (id === null) return
    await revokeShare(id, shareId)
    reload()
  }

  return { shares, loading: list.loading, error: list.error, reload, share, revoke }
}

import { onBeforeUnmount, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import type { DatasetEventName } from '@shared/schemas/comment.schema'
import { datasetEventsUrl } from '@/api/regions'
import type { DatasetRef } from '@/api/quality'

type Handlers = Partial<Record<DatasetEventName, (data: unknown) => void>>

/**
 * Listens to a dataset's live stream (new and changed comments and regions) while the page is
 * open. EventSource reconnects by itself after a dropped connection; `live` says whether the
 * stream is open, so the page can tell people when they would need to reload.
 */
export function useDatasetEvents(
  datasetId: MaybeRefOrGetter<DatasetRef | null>,
  handlers: Handlers,
) {
  const live = ref(false)
  let source: EventSource | null = null

  function close() {
    source?.close()
    source = null
    live.value = false
  }

  function open(id: DatasetRef) {
    close()
    if (typeof EventSource === 'undefined') return
    source = new EventSource(datasetEventsUrl(id), { withCredentials: true })
    source.onopen = () => (live.value = true)
    source.onerror = () => (live.value = false)
    for (const [name, handle] of Object.entries(handlers)) {
      source.addEventListener(name, (e) => handle(JSON.parse((e as MessageEvent<string>).data)))
    }
  }

  watch(
    () => toValue(datasetId),
    (id) => (id === null ? close() : open(id)),
    { immediate: true },
  )
  onBeforeUnmount(close)
  return { live }
}

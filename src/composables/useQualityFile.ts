import { computed, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { listFiles } from '@/api/files'
import { useDatasetsStore } from '@/stores/datasets.store'

/**
 * The dataset and the name of the file a quality page is about, for its heading. Neither is
 * needed to show the report, so a failure here only leaves the heading plainer.
 */
export function useQualityFile(
  idOrAccession: MaybeRefOrGetter<string>,
  fileId: MaybeRefOrGetter<number>,
) {
  const store = useDatasetsStore()
  const fileName = ref<string | null>(null)
  watch(
    () => toValue(idOrAccession),
    (id) => {
      if (!store.showing(id)) void store.open(id)
    },
    { immediate: true },
  )
  const dataset = computed(() => store.showing(toValue(idOrAccession)))

  let latest = 0
  watch(
    [() => dataset.value?.id, () => toValue(fileId)],
    async ([datasetId, id]) => {
      const mine = ++latest
      fileName.value = null
      if (datasetId === undefined) return
      try {
        const answer = await listFiles(datasetId)
        if (mine === latest) fileName.value = answer.items.find((f) => f.id === id)?.name ?? null
      } catch {
        // The heading names the file by its number instead.
      }
    },
    { immediate: true },
  )
  return { dataset, fileName }
}

import { computed, shallowRef, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { getMetadata, getProjectSuggestions, type ProjectSuggestions } from '@/api/metadata'
import { useAsync } from '@/composables/useAsync'
import { useDatasetsStore } from '@/stores/datasets.store'
import { useSessionStore } from '@/stores/session.store'
import { subjectOf } from '@/utils/dataset'
import { getAt } from '@/utils/metadataPaths'
import { withShippedSuggestions } from '@/utils/suggestions'
import { taxonIdOf } from '@shared/metadata/suggested-terms'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import { useMetadataAutosave } from './useMetadataAutosave'
import { useMetadataDraft } from './useMetadataDraft'

const ORGANISM = 'biosample.organism.name'
const TAXON = 'biosample.organism.taxonId'

/** The describe page: the dataset, its description as a live draft, autosave and suggestions. */
export function useDescribePage(idOrAccession: MaybeRefOrGetter<string>) {
  const store = useDatasetsStore()
  const session = useSessionStore()
  watch(
    () => toValue(idOrAccession),
    (id) => void store.open(id),
    { immediate: true },
  )
  const dataset = computed(() => store.showing(toValue(idOrAccession)))
  const editable = computed(
    () => dataset.value !== null && session.ability.can('edit', subjectOf(dataset.value)),
  )

  const draft = useMetadataDraft()
  const autosave = useMetadataAutosave(draft, () => dataset.value, store.update)
  const projectSuggestions = shallowRef<ProjectSuggestions>({})
  const suggestions = computed(() => withShippedSuggestions(projectSuggestions.value))

  const loader = useAsync(async (d: DatasetDto) => {
    const answer = await getMetadata(d.id)
    draft.load(answer.metadata, d)
    autosave.settled()
    return true
  })
  // Once per dataset: saving the title settles the store's copy, which must not reload the form.
  watch(
    () => dataset.value?.id,
    () => {
      const d = dataset.value
      if (!d) return
      void loader.run(d)
      if (editable.value) {
        getProjectSuggestions(d.project.id).then(
          (s) => (projectSuggestions.value = s),
          () => (projectSuggestions.value = {}), // a help; the shipped vocabulary still suggests
        )
      }
    },
    { immediate: true },
  )

  function edit(path: string, value: unknown) {
    if (!editable.value) return
    draft.set(path, value)
    // A listed organism brings its taxon id, unless one is typed already.
    const taxonId = path === ORGANISM && typeof value === 'string' ? taxonIdOf(value) : null
    if (taxonId !== null && getAt(draft.draft.value, TAXON) == null) draft.set(TAXON, taxonId)
    autosave.changed()
  }

  /** Writes several values at once (an import, a saved instrument), then saves. */
  function editMany(values: { path: string; value: unknown }[]) {
    values.forEach(({ path, value }) => edit(path, value))
    void autosave.flush()
  }

  return { store, dataset, editable, draft, autosave, suggestions, loader, edit, editMany }
}

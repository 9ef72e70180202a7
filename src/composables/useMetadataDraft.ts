import { computed, reactive, ref } from 'vue'
import { isHumanDerived } from '@shared/metadata/biosample.schema'
import { computeCompleteness, promotedTiers } from '@shared/metadata/completeness'
import type { DatasetMetadata } from '@shared/metadata/metadata.schema'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import { checkCore, checkDraft, type CoreValues, type FieldMessages } from '@/utils/metadataIssues'
import { cleanDocument, setAt, type Draft } from '@/utils/metadataPaths'
import { isCoreField } from '@/utils/metadataVocabulary'

// Completeness and the human-sample rule only look at which values are present, so a draft
// that does not validate yet can be read as a document for them.
const asMetadata = (draft: Draft) => draft as DatasetMetadata

/**
 * A dataset's description as it is being typed: the metadata document and the dataset's own
 * title, description and licence, with the shared schema's verdict and completeness kept live.
 */
export function useMetadataDraft() {
  const draft = ref<Draft>({})
  const core = reactive<CoreValues>({ title: '', description: '', licence: '' })
  /** What the server refused in the last save, until the field is edited. */
  const serverMessages = ref<FieldMessages>({})

  const cleaned = computed(() => cleanDocument(draft.value))
  const check = computed(() => checkDraft(cleaned.value))
  const coreMessages = computed(() => checkCore(core))
  const localMessages = computed(() => ({ ...check.value.errors, ...coreMessages.value }))
  const messages = computed(() => ({ ...serverMessages.value, ...localMessages.value }))

  const asDocument = computed(() =>
    check.value.ok ? check.value.metadata : asMetadata(cleaned.value),
  )
  const completeness = computed(() => computeCompleteness(asDocument.value, core))
  const humanDerived = computed(() => isHumanDerived(asDocument.value.biosample))
  /** Tiers some answers raise, as completeness counts them. */
  const tiers = computed(() => promotedTiers(asDocument.value))

  function set(path: string, value: unknown) {
    if (isCoreField(path)) core[path] = typeof value === 'string' ? value : ''
    else setAt(draft.value, path, value)
    forgetServerMessages(path)
  }

  function forgetServerMessages(path: string) {
    const kept = Object.entries(serverMessages.value).filter(
      ([p]) => p !== path && !p.startsWith(`${path}.`),
    )
    if (kept.length !== Object.keys(serverMessages.value).length) {
      serverMessages.value = Object.fromEntries(kept)
    }
  }

  function load(metadata: DatasetMetadata, dataset: DatasetDto) {
    draft.value = structuredClone(metadata)
    core.title = dataset.title
    core.description = dataset.description
    core.licence = dataset.licence
    serverMessages.value = {}
  }

  return {
    draft,
    core,
    cleaned,
    check,
    localMessages,
    messages,
    serverMessages,
    completeness,
    humanDerived,
    tiers,
    set,
    load,
  }
}

export type MetadataDraft = ReturnType<typeof useMetadataDraft>

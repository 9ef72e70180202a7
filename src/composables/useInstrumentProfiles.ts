import { computed, ref, shallowRef } from 'vue'
import { instrumentSchema, type InstrumentMetadata } from '@shared/metadata/instrument.schema'
import { errorMessage } from '@/api/client'
import {
  createInstrumentProfile,
  listInstrumentProfiles,
  type InstrumentProfileDto,
} from '@/api/instrumentProfiles'
import { useSessionStore } from '@/stores/session.store'
import { filledLeaves, type Draft } from '@/utils/metadataPaths'
import { describeWithinSection, metadataVocabulary } from '@/utils/metadataVocabulary'

/** The lab's saved instruments: listing them, saving the one described, and using one. */
export function useInstrumentProfiles(draft: () => Draft) {
  const session = useSessionStore()
  const profiles = shallowRef<InstrumentProfileDto[]>([])
  const loading = ref(false)
  const error = ref<string | null>(null)

  /** Only members of a lab can keep instruments (the lab owns them). */
  const canSave = computed(() => {
    const organization = session.user?.organization?.id ?? null
    return (
      organization !== null &&
      session.ability.can('create', { __type: 'InstrumentProfile', organization })
    )
  })

  /** The instrument section as it would be stored, or null while it is empty or invalid. */
  const savable = computed<InstrumentMetadata | null>(() => {
    const section = draft().instrument
    if (!section || !filledLeaves(section).length) return null
    const parsed = instrumentSchema.safeParse(section)
    return parsed.success ? parsed.data : null
  })

  /** The labels of what using a saved instrument would replace. */
  const replaces = computed(() =>
    filledLeaves(draft().instrument, 'instrument').map(([path]) =>
      describeWithinSection(metadataVocabulary(), path, path),
    ),
  )

  async function load() {
    loading.value = true
    error.value = null
    try {
      profiles.value = (await listInstrumentProfiles()).items
    } catch (e) {
      error.value = errorMessage(e)
    } finally {
      loading.value = false
    }
  }

  async function save(name: string) {
    if (!savable.value) throw new Error('Describe the instrument (with valid values) first.')
    const created = await createInstrumentProfile({ name, instrument: savable.value })
    profiles.value = [...profiles.value, created].sort((a, b) => a.name.localeCompare(b.name))
  }

  return { profiles, loading, error, canSave, savable, replaces, load, save }
}

import { computed, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { useRouter } from 'vue-router'
import { ApiError } from '@/api/client'
import { projectSubject } from '@shared/permissions/abilities'
import type { ReviewDecision } from '@shared/schemas/dataset.schema'
import type { DatasetPermissions } from '@/components/DatasetActionBar.vue'
import { useDatasetsStore } from '@/stores/datasets.store'
import { useProjectsStore } from '@/stores/projects.store'
import { useSessionStore } from '@/stores/session.store'
import { subjectOf } from '@/utils/dataset'

export type DatasetPagePermissions = DatasetPermissions & {
  share: boolean
  readProject: boolean
  download: boolean
  preview: boolean
  annotate: boolean
}

/** The open dataset, what this person may do with it, and the dialogs of its actions. */
export function useDatasetPage(idOrAccession: MaybeRefOrGetter<string>) {
  const store = useDatasetsStore()
  const session = useSessionStore()
  const router = useRouter()
  watch(
    () => toValue(idOrAccession),
    (id) => void store.open(id),
    { immediate: true },
  )

  const dataset = computed(() => store.showing(toValue(idOrAccession)))

  const can = computed<DatasetPagePermissions>(() => {
    const d = dataset.value
    const a = session.ability
    if (!d) {
      return {
        edit: false,
        delete: false,
        submit: false,
        curate: false,
        embargo: false,
        share: false,
        readProject: false,
        download: false,
        preview: false,
        annotate: false,
      }
    }
    const subject = subjectOf(d)
    return {
      edit: a.can('edit', subject),
      delete: a.can('delete', subject),
      submit: a.can('submit', subject),
      curate: a.can('curate', subject),
      embargo: a.can('embargo', subject),
      share: a.can('share', subject),
      readProject: a.can('read', projectSubject(d.project.id)),
      download: a.can('download', subject),
      preview: a.can('preview', subject),
      annotate: a.can('annotate', subject),
    }
  })

  const dialogs = {
    delete: ref(false),
    submit: ref(false),
    embargo: ref(false),
    review: ref(false),
  }
  const decision = ref<ReviewDecision>('approve')
  function openReview(d: ReviewDecision) {
    decision.value = d
    dialogs.review.value = true
  }

  /** Required fields the server named when it refused to submit (409), until dismissed. */
  const submitGaps = ref<string[]>([])
  async function submit() {
    submitGaps.value = []
    try {
      await store.submit()
    } catch (e) {
      if (!(e instanceof ApiError) || e.status !== 409) throw e
      const missing = Object.keys(e.fieldErrors)
      if (!missing.length) throw e
      submitGaps.value = missing
    }
  }

  async function remove() {
    const projectId = dataset.value?.project.id
    await store.remove()
    void useProjectsStore().load()
    await router.push(
      projectId ? { name: 'project', params: { id: projectId } } : { name: 'datasets' },
    )
  }

  return {
    store,
    dataset,
    can,
    dialogs,
    decision,
    openReview,
    submit,
    submitGaps,
    remove,
    reload: () => store.open(toValue(idOrAccession)),
  }
}

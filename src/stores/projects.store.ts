import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { CreateProjectInput, ProjectDto } from '@shared/schemas/project.schema'
import { errorMessage } from '@/api/client'
import { createProject, listProjects } from '@/api/projects'
import { ability } from '@/plugins/casl'
import { newDraftIn } from '@/utils/dataset'
import { useSessionStore } from './session.store'

/** The projects the signed-in person can see; shared by the home page, lists and forms. */
export const useProjectsStore = defineStore('projects', () => {
  const items = ref<ProjectDto[]>([])
  const loading = ref(false)
  const loaded = ref(false)
  const error = ref<string | null>(null)

  /** Projects where the person may start a dataset (offered in the create form). */
  const creatable = computed(() =>
    items.value.filter((p) => ability.can('create', newDraftIn(p.id))),
  )
  const mine = computed(() => items.value.filter((p) => p.myRole !== null))

  async function load(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      items.value = (await listProjects()).items
      loaded.value = true
    } catch (e) {
      error.value = errorMessage(e)
    } finally {
      loading.value = false
    }
  }

  /** Loads only the first time; pages call this on mount. */
  async function ensure(): Promise<void> {
    if (!loaded.value && !loading.value) await load()
  }

  async function create(body: CreateProjectInput): Promise<ProjectDto> {
    const project = await createProject(body)
    // The creator now owns the project: their abilities change with it.
    await Promise.all([useSessionStore().refresh(), load()])
    return project
  }

  function clear() {
    items.value = []
    loaded.value = false
  }

  return { items, loading, loaded, error, creatable, mine, load, ensure, create, clear }
})

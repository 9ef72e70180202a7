import { beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import { createVuetify } from 'vuetify'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import type { ProjectDto } from '@shared/schemas/project.schema'
import { ApiError } from '@/api/client'
import { createDataset } from '@/api/datasets'
import { listProjects } from '@/api/projects'
import { updateAbility } from '@/plugins/casl'
import DatasetCreateView from '@/views/DatasetCreateView.vue'

vi.mock('@/api/projects', () => ({ listProjects: vi.fn(), createProject: vi.fn() }))
vi.mock('@/api/datasets', () => ({ createDataset: vi.fn() }))

const project: ProjectDto = {
  id: 7,
  name: 'Pore complexes',
  description: '',
  organization: null,
  myRole: 'member',
  datasetCount: 0,
  createdAt: '2026-01-01T00:00:00Z',
}

async function mountForm() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const Stub = { template: '<div />' }
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/datasets/new', name: 'dataset-new', component: DatasetCreateView },
      { path: '/datasets', name: 'datasets', component: Stub },
      { path: '/datasets/:idOrAccession', name: 'dataset', component: Stub },
    ],
  })
  await router.push('/datasets/new?projectId=7')
  const wrapper = mount(DatasetCreateView, {
    global: { plugins: [pinia, router, createVuetify()] },
    attachTo: document.body,
  })
  await flushPromises()
  return { wrapper, router }
}

/** The text input of the field whose label is `label`, found as a person would. */
function fieldInput(wrapper: Awaited<ReturnType<typeof mountForm>>['wrapper'], label: string) {
  const field = wrapper.findAll('.v-input').find((f) => f.find('label').text() === label)
  if (!field) throw new Error(`No field labelled ${label}`)
  return { field, input: field.find('input, textarea') }
}

beforeEach(() => {
  vi.mocked(listProjects).mockResolvedValue({ items: [project] })
  vi.mocked(createDataset).mockReset()
  updateAbility({
    id: 5,
    siteRole: null,
    organizationId: 2,
    memberships: [{ projectId: 7, role: 'member' }],
    shares: [],
  })
})

describe('DatasetCreateView', () => {
  it("shows the server's message under the field it is about", async () => {
    vi.mocked(createDataset).mockRejectedValue(
      new ApiError({
        status: 400,
        title: 'Invalid request',
        errors: [{ pointer: '#/title', detail: 'A dataset with this title already exists here' }],
      }),
    )
    const { wrapper } = await mountForm()

    await fieldInput(wrapper, 'Title').input.setValue('Nuclear pores, dSTORM')
    await wrapper.find('form').trigger('submit')
    await flushPromises()

    expect(createDataset).toHaveBeenCalledWith(
      expect.objectContaining({
        projectId: 7,
        title: 'Nuclear pores, dSTORM',
        licence: 'CC-BY-4.0',
      }),
    )
    expect(fieldInput(wrapper, 'Title').field.text()).toContain(
      'A dataset with this title already exists here',
    )
    wrapper.unmount()
  })

  it('opens the new dataset once it is created', async () => {
    vi.mocked(createDataset).mockResolvedValue({ id: 1, accession: 'STPL-000001' } as DatasetDto)
    const { wrapper, router } = await mountForm()

    await fieldInput(wrapper, 'Title').input.setValue('Nuclear pores, dSTORM')
    await wrapper.find('form').trigger('submit')
    await flushPromises()

    expect(createDataset).toHaveBeenCalledTimes(1)
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/datasets/STPL-000001'))
    wrapper.unmount()
  })
})

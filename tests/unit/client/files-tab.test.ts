import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import type { MeDto } from '@shared/schemas/user.schema'
import type { FilesAnswer } from '@/api/files'
import App from '@/App.vue'
import { installAbility } from '@/plugins/casl'
import vuetify from '@/plugins/vuetify'
import { requireSignIn } from '@/router/guards'
import { routes } from '@/router/routes'
import { answerFor, dataset } from './fixtures'
import '@/views/DatasetView.vue'

const draft: DatasetDto = { ...dataset, state: 'draft', submittedAt: null }
const depositor: MeDto = {
  user: { id: 9, email: 'd@lab.example', name: 'A Depositor', siteRole: null, organization: null },
  viewer: {
    ...{ id: 9, siteRole: null, organizationId: null, shares: [] },
    memberships: [{ projectId: 7, role: 'member' }],
  },
  demo: false,
}
const filesAnswer: FilesAnswer = {
  items: [
    {
      ...{ id: 4, name: 'spots.csv', size: 2_500_000, sha256: 'c0ffee'.padEnd(64, '0') },
      ...{ kind: 'localization_table', status: 'needs_mapping', mediaType: 'text/csv' },
      ...{ problem: 'No column looks like x', summary: null, job: null },
      createdAt: '2026-01-01T00:00:00Z',
    },
    {
      ...{ id: 5, name: 'stack.tif', size: 10_485_760_000, sha256: null, kind: 'raw_stack' },
      ...{ status: 'processing', mediaType: 'image/tiff', problem: null, summary: null },
      job: { state: 'running', progress: 0.42, message: 'reading frames' },
      createdAt: '2026-01-01T00:00:00Z',
    },
  ],
  uploadsInProgress: [],
}

beforeEach(() => {
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string) => {
      const body = url.endsWith('/files') ? filesAnswer : answerFor(url, depositor, draft)
      const status = typeof body === 'object' && body && 'status' in body ? 404 : 200
      return new Response(JSON.stringify(body), {
        status,
        headers: { 'content-type': 'application/json' },
      })
    }),
  )
})
afterEach(() => vi.unstubAllGlobals())

describe('the Files tab', () => {
  it('lists the files with words for their status and progress, and offers uploading', async () => {
    const router = createRouter({ history: createMemoryHistory(), routes })
    router.beforeEach(requireSignIn(() => {}))
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {})
    const wrapper = mount(App, {
      global: { plugins: [createPinia(), router, vuetify, { install: installAbility }] },
      attachTo: document.body,
    })
    await router.push('/datasets/STPL-000001')
    await flushPromises()
    await vi.waitFor(() => expect(wrapper.find('.v-skeleton-loader').exists()).toBe(false))
    await wrapper
      .findAll('[role="tab"]')
      .find((t) => t.text() === 'Files')!
      .trigger('click')
    await vi.waitFor(() => expect(wrapper.find('[data-testid="files-table"]').exists()).toBe(true))

    const text = wrapper.find('[data-testid="files-table"]').text()
    expect(text).toContain('Needs column mapping')
    expect(text).toContain('Map columns')
    expect(text).toContain('2.38 MiB')
    expect(text).toContain('9.77 GiB')
    expect(text).toContain('reading frames · 42 %')
    expect(text).toContain('c0ffee00…0000')
    expect(wrapper.text()).toContain('Choose files')
    expect(wrapper.text()).toContain('Download all (zip)')
    expect(wrapper.find('a[href="/api/datasets/1/manifest.txt"]').exists()).toBe(true)
    expect(
      warn.mock.calls.map((c) => String(c[0])).filter((w) => w.includes('[Vue warn]')),
    ).toEqual([])
    warn.mockRestore()
    wrapper.unmount()
  })
})

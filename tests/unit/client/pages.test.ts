import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import type { MeDto } from '@shared/schemas/user.schema'
import App from '@/App.vue'
import { installAbility } from '@/plugins/casl'
import vuetify from '@/plugins/vuetify'
import { requireSignIn } from '@/router/guards'
import { routes } from '@/router/routes'
import { answerFor, dataset, signedIn } from './fixtures'
// The largest page, loaded with the file so that compiling it is not counted as drawing it.
import '@/views/DatasetMetadataView.vue'

let me: MeDto = signedIn
let shown: DatasetDto = dataset

beforeEach(() => {
  me = signedIn
  shown = dataset
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string) => {
      const body = answerFor(url, me, shown)
      const status = typeof body === 'object' && body && 'status' in body ? 404 : 200
      return new Response(JSON.stringify(body), {
        status,
        headers: { 'content-type': 'application/json' },
      })
    }),
  )
})
afterEach(() => vi.unstubAllGlobals())

async function render(path: string) {
  const leave = vi.fn()
  const router = createRouter({ history: createMemoryHistory(), routes })
  router.beforeEach(requireSignIn(leave))
  const warn = vi.spyOn(console, 'warn').mockImplementation(() => {})
  const wrapper = mount(App, {
    global: { plugins: [createPinia(), router, vuetify, { install: installAbility }] },
    attachTo: document.body,
  })
  await router.push(path)
  await flushPromises()
  await vi.waitFor(() => expect(wrapper.find('.v-skeleton-loader').exists()).toBe(false))
  const warnings = warn.mock.calls.map((c) => String(c[0]))
  warn.mockRestore()
  return { wrapper, leave, warnings }
}

describe('every page draws from the API', () => {
  const pages: [string, string[]][] = [
    ['/', ['My projects', 'Pore complexes', 'Recent datasets', 'STPL-000001']],
    ['/datasets', ['Datasets', 'Search datasets', 'Nuclear pores imaged by dSTORM', 'Submitted']],
    [
      '/datasets/STPL-000001',
      [
        'STPL-000001',
        'Overview',
        'Access and sharing',
        'Approve',
        'Request changes',
        'Description of the experiment',
        'required missing',
        'Methods text',
      ],
    ],
    [
      '/datasets/STPL-000001/describe',
      ['Describe STPL-000001', 'You can read this description', 'Instrument', '% complete'],
    ],
    ['/datasets/STPL-000001/edit', ['This dataset cannot be edited now']],
    ['/datasets/new?projectId=7', ['New dataset', 'Title', 'Description', 'Create dataset']],
    ['/projects', ['Projects', 'New project', 'Pore complexes']],
    ['/projects/7', ['Nuclear pore architecture.', 'Members', 'Add member', 'New dataset']],
    [
      '/profile',
      ['o@lab.example', 'Site admin', 'Personal access tokens', 'stp_ab12', 'Create token'],
    ],
    ['/admin/mail', ['Caught mail', 'Submitted for curation']],
    ['/admin/audit', ['Audit log', 'Nothing has been recorded yet.', 'Export CSV']],
    [
      '/admin/users',
      ['Users', 'Former Colleague', 'former@lab.example', 'Deactivated', 'Reactivate'],
    ],
    ['/no/such/page', ['Page not found']],
  ]
  it.each(pages)('%s shows its content without Vue warnings', async (path, texts) => {
    const { wrapper, warnings } = await render(path)
    for (const text of texts) expect(wrapper.text()).toContain(text)
    expect(wrapper.text()).toContain('Sign out')
    expect(warnings.filter((w) => w.includes('[Vue warn]'))).toEqual([])
    wrapper.unmount()
  })

  it('shows a signed-out visitor the welcome, the public datasets and a Sign in button', async () => {
    me = { user: null, viewer: null, demo: false }
    const { wrapper } = await render('/')
    expect(wrapper.text()).toContain('Welcome to Stipple')
    expect(wrapper.text()).toContain('Public datasets')
    const signIn = wrapper.findAll('button').filter((b) => b.text() === 'Sign in')
    expect(signIn).toHaveLength(1)
    expect(wrapper.text()).not.toContain('Sign out')
    expect(wrapper.text()).not.toContain('Caught mail')
    wrapper.unmount()
  })

  it('sends a signed-out visitor of the profile page to sign in', async () => {
    me = { user: null, viewer: null, demo: false }
    const { wrapper, leave } = await render('/profile')
    expect(leave).toHaveBeenCalledWith('/profile')
    wrapper.unmount()
  })

  it('offers a depositor the actions on their draft, and none of the curators', async () => {
    me = {
      user: {
        id: 9,
        email: 'd@lab.example',
        name: 'A Depositor',
        siteRole: null,
        organization: { id: 2, name: 'A lab' },
      },
      viewer: {
        id: 9,
        siteRole: null,
        organizationId: 2,
        memberships: [{ projectId: 7, role: 'member' }],
        shares: [],
      },
      demo: false,
    }
    shown = { ...dataset, state: 'draft', submittedAt: null }
    const { wrapper } = await render('/datasets/STPL-000001')
    const buttons = wrapper
      .find('[role="toolbar"]')
      .findAll('a, button')
      .map((b) => b.text())
    expect(buttons).toEqual(['Edit', 'Describe', 'Submit for curation', 'Delete'])
    wrapper.unmount()
  })

  it('offers the public no actions on a released dataset', async () => {
    me = { user: null, viewer: null, demo: false }
    shown = { ...dataset, state: 'approved', approvedAt: dataset.updatedAt }
    const { wrapper } = await render('/datasets/STPL-000001')
    expect(wrapper.text()).toContain('Approved, public')
    expect(wrapper.find('[role="toolbar"]').findAll('a, button')).toHaveLength(0)
    wrapper.unmount()
  })
})

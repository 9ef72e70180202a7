import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createVuetify } from 'vuetify'
import type { Viewer } from '@shared/permissions/viewer'
import { updateAbility } from '@/plugins/casl'
import AuditLogView from '@/views/AuditLogView.vue'

const viewer = (siteRole: Viewer['siteRole']): Viewer => ({
  id: 7,
  siteRole,
  organizationId: 1,
  memberships: [{ projectId: 1, role: 'member' }],
  shares: [],
})

let requests: string[]
beforeEach(() => {
  requests = []
  vi.stubGlobal('fetch', async (url: string) => {
    requests.push(String(url))
    return new Response(JSON.stringify({ items: [], total: 0 }), {
      headers: { 'content-type': 'application/json' },
    })
  })
  setActivePinia(createPinia())
})
afterEach(() => {
  vi.unstubAllGlobals()
  updateAbility(null)
})

async function render(siteRole: Viewer['siteRole']) {
  updateAbility(viewer(siteRole))
  const wrapper = mount(AuditLogView, { global: { plugins: [createVuetify()] } })
  await flushPromises()
  return wrapper
}

describe('the audit log page', () => {
  it('tells a depositor once that it is not open to them, and asks the server for nothing', async () => {
    const wrapper = await render(null)
    expect(wrapper.find('[data-testid="audit-not-allowed"]').text()).toContain('Not open to you')
    expect(wrapper.text()).not.toContain('Nothing has been recorded yet')
    expect(requests).toEqual([])
    wrapper.unmount()
  })

  it('lists the events for a data steward', async () => {
    const wrapper = await render('steward')
    expect(wrapper.find('[data-testid="audit-not-allowed"]').exists()).toBe(false)
    expect(requests.some((url) => url.includes('/api/audit'))).toBe(true)
    expect(wrapper.text()).toContain('Nothing has been recorded yet')
    wrapper.unmount()
  })
})

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
import { answerFor, dataset } from './fixtures'
// Loaded with the test file, so its first use in a test is not also its compilation.
import '@/views/DatasetMetadataView.vue'
import '@/views/DatasetView.vue'

const depositor: MeDto = {
  user: { id: 9, email: 'd@lab.example', name: 'A Depositor', siteRole: null, organization: null },
  viewer: {
    id: 9,
    siteRole: null,
    organizationId: null,
    memberships: [{ projectId: 7, role: 'member' }],
    shares: [],
  },
  demo: false,
}
const draft: DatasetDto = { ...dataset, state: 'draft', submittedAt: null }
type Answer = { status: number; body: unknown }
let writes: { method: string; url: string; body: unknown }[] = []
let answerWrite: (method: string, url: string) => Answer

beforeEach(() => {
  writes = []
  answerWrite = () => ({ status: 200, body: {} })
  vi.stubGlobal(
    'visualViewport',
    Object.assign(new EventTarget(), {
      width: 1024,
      height: 768,
      scale: 1,
      offsetLeft: 0,
      offsetTop: 0,
    }),
  )
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string, init?: RequestInit) => {
      const method = init?.method ?? 'GET'
      let answer: Answer
      if (method === 'GET') {
        const body = answerFor(url, depositor, draft)
        answer = { status: typeof body === 'object' && body && 'status' in body ? 404 : 200, body }
      } else {
        writes.push({ method, url, body: init?.body ? JSON.parse(String(init.body)) : undefined })
        answer = answerWrite(method, url)
      }
      return new Response(JSON.stringify(answer.body), {
        status: answer.status,
        headers: { 'content-type': 'application/json' },
      })
    }),
  )
})
afterEach(() => vi.unstubAllGlobals())

async function open(path: string) {
  const router = createRouter({ history: createMemoryHistory(), routes })
  router.beforeEach(requireSignIn(() => {}))
  const wrapper = mount(App, {
    global: { plugins: [createPinia(), router, vuetify, { install: installAbility }] },
    attachTo: document.body,
  })
  await router.push(path)
  await flushPromises()
  await vi.waitFor(() => expect(wrapper.find('.v-skeleton-loader').exists()).toBe(false))
  return wrapper
}

const refused = (pointer: string, detail: string): Answer => ({
  status: 400,
  body: {
    type: 'about:blank',
    title: 'Invalid request',
    status: 400,
    errors: [{ pointer, detail }],
  },
})

// Whole pages with every field: quick alone, slower when the machine is busy with other work.
describe('the describe page', { timeout: 15_000 }, () => {
  it('saves on blur, shows what the server refused under the field, and keeps the typing', async () => {
    answerWrite = () => refused('#/instrument/objective/lensNA', 'Refused by the server')
    const wrapper = await open('/datasets/STPL-000001/describe')
    const na = () => wrapper.find('#md-instrument-objective-lensNA')
    await na().trigger('focus')
    await na().setValue('1.45')
    await na().trigger('blur')
    await flushPromises()

    expect(writes).toEqual([
      {
        method: 'PUT',
        url: '/api/datasets/1/metadata',
        body: { instrument: { objective: { lensNA: 1.45, immersion: 'Oil' } } },
      },
    ])
    expect(wrapper.find('[data-testid="save-status"]').text()).toBe(
      'Not saved: the server refused one field',
    )
    const field = na().element.closest('.v-input')
    expect(field?.textContent).toContain('Refused by the server')
    expect((na().element as HTMLInputElement).value).toBe('1.45')

    await na().setValue('1.4')
    expect(na().element.closest('.v-input')?.textContent).not.toContain('Refused by the server')
    wrapper.unmount()
  })

  it('does not send a document the shared schema rejects', async () => {
    const wrapper = await open('/datasets/STPL-000001/describe')
    const na = wrapper.find('#md-instrument-objective-lensNA')
    await na.trigger('focus')
    await na.setValue('1.7')
    await na.trigger('blur')
    await flushPromises()
    expect(writes).toEqual([])
    expect(wrapper.find('[data-testid="save-status"]').text()).toBe(
      'Not saved: Numerical aperture (NA) needs fixing',
    )
    expect(na.element.closest('.v-input')?.textContent).toContain('not possible with oil immersion')
    wrapper.unmount()
  })

  it('lists the missing fields in words when submitting is refused', async () => {
    answerWrite = () => ({
      status: 409,
      body: {
        type: 'about:blank',
        title: 'Conflict',
        status: 409,
        detail: 'STPL-000001 cannot be submitted yet: 2 required fields missing.',
        errors: [
          {
            pointer: '#/instrument/objective/nominalMagnification',
            detail: 'Nominal magnification is required',
          },
          { pointer: '#/labelling', detail: 'at least one entry in Labelling is required' },
        ],
      },
    })
    const wrapper = await open('/datasets/STPL-000001')
    await wrapper
      .findAll('button')
      .find((b) => b.text() === 'Submit for curation')
      ?.trigger('click')
    await flushPromises()
    const confirm = [...document.body.querySelectorAll('button')].find(
      (b) => b.textContent?.trim() === 'Submit',
    )
    confirm?.click()
    await flushPromises()
    const gaps = wrapper.find('[data-testid="submit-gaps"]')
    expect(gaps.text()).toContain('Not submitted: 2 required fields are missing')
    expect(gaps.text()).toContain('Instrument › Objective › Nominal magnification')
    expect(gaps.find('a').attributes('href')).toBe(
      '/datasets/STPL-000001/describe?field=instrument.objective.nominalMagnification',
    )
    wrapper.unmount()
  })
})

/**
 * Issue 16 on the client: a dataset that is not there (404) or not open (403) reads "not found"
 * with a way to the list, and only a fault that may pass offers "Try again"; the deposited files
 * are counted in words; the form's suggestions put the project's own values first.
 */
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createMemoryHistory, createRouter } from 'vue-router'
import { createVuetify } from 'vuetify'
import DatasetLoadProblem from '@/components/DatasetLoadProblem.vue'
import { fileCountText } from '@/utils/fileCount'
import { withShippedSuggestions } from '@/utils/suggestions'

const router = createRouter({
  history: createMemoryHistory(),
  routes: [{ path: '/datasets', name: 'datasets', component: { template: '<p />' } }],
})
const problem = (status: number | null) =>
  mount(DatasetLoadProblem, {
    props: {
      status,
      message: 'The server answered 500.',
      title: 'This dataset could not be shown',
    },
    global: { plugins: [createVuetify(), router] },
  })

describe('a dataset that could not be loaded', () => {
  it.each([404, 403])('answered %i: not found, a link to the list, no "Try again"', (status) => {
    const wrapper = problem(status)
    expect(wrapper.text()).toContain('Dataset not found')
    expect(wrapper.text()).not.toContain('Try again')
    expect(wrapper.find('a[href="/datasets"]').exists()).toBe(true)
  })

  it.each([0, 500, 503, null])('failed with %s: the error and "Try again"', async (status) => {
    const wrapper = problem(status)
    expect(wrapper.text()).toContain('This dataset could not be shown')
    expect(wrapper.text()).not.toContain('not found')
    const retry = wrapper.findAll('button').find((b) => b.text() === 'Try again')
    expect(retry).toBeDefined()
    await retry!.trigger('click')
    expect(wrapper.emitted('retry')).toHaveLength(1)
  })
})

describe('the deposited files in words', () => {
  it('count the files and those ready', () => {
    expect(fileCountText([])).toBe('No files deposited')
    expect(fileCountText([{ status: 'ready' }])).toBe('1 file deposited, ready')
    expect(fileCountText([{ status: 'ready' }, { status: 'ready' }])).toBe(
      '2 files deposited, all ready',
    )
    expect(
      fileCountText([{ status: 'ready' }, { status: 'processing' }, { status: 'rejected' }]),
    ).toBe('3 files deposited, 1 ready')
  })
})

describe('suggestions', () => {
  it('come after what the project used before, each value once whatever its case', () => {
    const merged = withShippedSuggestions({
      'biosample.organism.name': ['Nothobranchius furzeri', 'homo sapiens'],
      'biosample.structure': ['nuclear pore complex'],
    })
    const organisms = merged['biosample.organism.name']!
    expect(organisms.slice(0, 2)).toEqual(['Nothobranchius furzeri', 'homo sapiens'])
    expect(organisms.filter((o) => o.toLowerCase() === 'homo sapiens')).toHaveLength(1)
    expect(organisms).toContain('Mus musculus')
    expect(merged['labelling.*.label']).toContain('Dendra2')
    expect(merged['biosample.structure']).toEqual(['nuclear pore complex'])
  })
})

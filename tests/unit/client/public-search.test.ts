/**
 * The public search page: one request per change of words, facet or page, with the chosen
 * facets sent as query parameters; facet chips show counts and toggle; the public page link
 * appears only for datasets that have a landing page.
 */
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { PublicSearchPage } from '@shared/schemas/public-search.schema'
import DatasetPublicPageLink from '@/components/DatasetPublicPageLink.vue'
import SearchFacets from '@/components/search/SearchFacets.vue'
import vuetify from '@/plugins/vuetify'
import { routes } from '@/router/routes'
import PublicSearchView from '@/views/PublicSearchView.vue'

const api = vi.hoisted(() => ({ searchPublicDatasets: vi.fn() }))
vi.mock('@/api/search', () => ({ searchPublicDatasets: api.searchPublicDatasets }))

/** A made-up answer shaped like GET /api/search. */
const page: PublicSearchPage = {
  items: [
    {
      accession: 'STPL-000007',
      title: 'Pore scaffold',
      summary: 'Localizations of Nup96.',
      authors: ['Avery Tester'],
      technique: 'dSTORM',
      structure: 'nuclear pore complex',
      organism: 'Mus musculus',
      probeClasses: ['organic dye'],
      year: 2026,
      frcResolutionNm: 18.25,
      embargoUntil: null,
    },
  ],
  total: 1,
  facets: {
    technique: [
      { value: 'dSTORM', count: 1 },
      { value: 'PALM', count: 4 },
    ],
    structure: [],
    organism: [{ value: 'Mus musculus', count: 1 }],
    probeClass: [],
    frcRange: [{ value: 'under-20', count: 1 }],
    year: [{ value: '2026', count: 1 }],
  },
}

afterEach(() => {
  vi.useRealTimers()
  api.searchPublicDatasets.mockReset()
})

async function mountView(path = '/search') {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push(path)
  const wrapper = mount(PublicSearchView, { global: { plugins: [vuetify, router] } })
  await flushPromises()
  return Object.assign(wrapper, { router })
}

describe('public search page', () => {
  it('shows the rows and facet counts, and asks again with a chosen facet', async () => {
    api.searchPublicDatasets.mockResolvedValue(page)
    const wrapper = await mountView()
    expect(api.searchPublicDatasets).toHaveBeenCalledTimes(1)
    expect(api.searchPublicDatasets.mock.calls[0]![0]).toMatchObject({ limit: 25, offset: 0 })
    const table = wrapper.find('[data-testid="public-search-table"]')
    expect(table.text()).toContain('Pore scaffold')
    expect(table.text()).toContain('18.3 nm')
    expect(table.find('a').attributes('href')).toBe('/d/STPL-000007')
    const chips = wrapper.findAll('[data-testid="facet-technique"]')
    expect(chips.map((c) => c.text())).toEqual(['dSTORM 1', 'PALM 4'])
    expect(wrapper.find('[data-testid="facet-frcRange"]').text()).toBe('under 20 nm 1')

    await chips[1]!.trigger('click')
    await flushPromises()
    expect(api.searchPublicDatasets).toHaveBeenCalledTimes(2)
    expect(api.searchPublicDatasets.mock.calls[1]![0]).toMatchObject({ technique: 'PALM' })
    await wrapper.findAll('[data-testid="facet-year"]')[0]!.trigger('click')
    await flushPromises()
    expect(api.searchPublicDatasets.mock.calls[2]![0]).toMatchObject({
      technique: 'PALM',
      year: 2026,
    })
  })

  it('says so when nothing matches, and shows a failed search with a retry', async () => {
    api.searchPublicDatasets.mockResolvedValueOnce({ ...page, items: [], total: 0 })
    const wrapper = await mountView()
    expect(wrapper.text()).toContain('No public datasets match')
    api.searchPublicDatasets.mockRejectedValueOnce(new Error('The server could not be reached'))
    await wrapper.findAll('[data-testid="facet-technique"]')[0]!.trigger('click')
    await flushPromises()
    expect(wrapper.text()).toContain('The search failed')
  })
})

describe('facets', () => {
  it('keeps a chosen value visible even when no result has it', () => {
    const wrapper = mount(SearchFacets, {
      props: { facets: page.facets, chosen: { organism: 'Danio rerio' }, loading: false },
      global: { plugins: [vuetify] },
    })
    const organisms = wrapper.findAll('[data-testid="facet-organism"]').map((c) => c.text())
    expect(organisms).toEqual(['Danio rerio 0', 'Mus musculus 1'])
  })
})

describe('public page link', () => {
  it('links approved, withdrawn and revised datasets to their landing page, never first drafts', () => {
    const link = (state: 'approved' | 'withdrawn' | 'draft' | 'submitted', version = 1) =>
      mount(DatasetPublicPageLink, {
        props: { dataset: { accession: 'STPL-000007', state, version } },
        global: { plugins: [vuetify] },
      }).find('[data-testid="public-page-link"]')
    expect(link('approved').attributes('href')).toBe('/d/STPL-000007')
    expect(link('withdrawn').exists()).toBe(true)
    expect(link('draft').exists()).toBe(false)
    expect(link('submitted').exists()).toBe(false)
    // A second version in the making: the approved first one keeps its page.
    expect(link('draft', 2).exists()).toBe(true)
  })

  it('starts from the words and facets in the address, and keeps the address in step', async () => {
    api.searchPublicDatasets.mockResolvedValue(page)
    const w = await mountView('/search?q=pore&organism=Mus%20musculus')
    expect(api.searchPublicDatasets).toHaveBeenCalledTimes(1)
    expect(api.searchPublicDatasets.mock.calls[0]![0]).toMatchObject({
      q: 'pore',
      organism: 'Mus musculus',
    })
    expect(
      (w.find('[data-testid="public-search-input"] input').element as HTMLInputElement).value,
    ).toBe('pore')
    await w.find('[data-testid="public-search-input"] input').setValue('nuclear pore')
    await flushPromises()
    await new Promise((r) => setTimeout(r, 50))
    console.log(JSON.stringify(w.router.currentRoute.value.fullPath))
    expect(w.router.currentRoute.value.query).toEqual({
      q: 'nuclear pore',
      organism: 'Mus musculus',
    })
  })
})

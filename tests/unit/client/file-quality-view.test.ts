import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ApiError } from '@/api/client'
import type { DatasetFileDto } from '@/api/files'
import DatasetFilesTable from '@/components/files/DatasetFilesTable.vue'
import vuetify from '@/plugins/vuetify'
import { routes } from '@/router/routes'
import FileQualityView from '@/views/FileQualityView.vue'
import { dataset } from './fixtures'
import {
  doneReport,
  failedReport,
  previewInfo,
  queuedReport,
  runningReport,
} from '../../fixtures/quality-report'

const api = vi.hoisted(() => ({
  getQuality: vi.fn(),
  getPreviewInfo: vi.fn(),
  getDataset: vi.fn(),
  listFiles: vi.fn(),
}))
vi.mock('@/api/quality', async (actual) => ({
  ...(await actual<typeof import('@/api/quality')>()),
  getQuality: api.getQuality,
  getPreviewInfo: api.getPreviewInfo,
}))
vi.mock('@/api/datasets', () => ({ getDataset: api.getDataset }))
vi.mock('@/api/files', () => ({ listFiles: api.listFiles }))
// OpenLayers and ECharts draw on canvases happy-dom does not have: stand-ins take their place.
vi.mock('@/components/quality/PreviewMap.vue', async () => {
  const { defineComponent, h } = await import('vue')
  return {
    default: defineComponent({
      props: ['info', 'datasetId', 'fileId', 'query'],
      setup: (props) => () => h('div', { 'data-testid': 'preview-map', 'data-file': props.fileId }),
    }),
  }
})
// The regions panel talks to its own routes and an event stream (the regions browser test covers
// it); here it would only try a server that is not there.
vi.mock('@/components/regions/RegionsPanel.vue', async () => {
  const { defineComponent, h } = await import('vue')
  return { default: defineComponent(() => () => h('aside', { 'data-testid': 'regions-panel' })) }
})
vi.mock('@/components/quality/QualityChart.vue', async () => {
  const { defineComponent, h } = await import('vue')
  return {
    default: defineComponent({
      props: ['option', 'caption'],
      setup: (props) => () => h('figure', { 'data-testid': 'chart' }, props.caption),
    }),
  }
})

const spots = {
  ...{ id: 8, name: 'spots.csv', size: 10, sha256: 'ab', kind: 'localization_table' },
  ...{ status: 'ready', mediaType: null, problem: null, summary: null, job: null },
  createdAt: '2026-01-01T00:00:00Z',
} satisfies DatasetFileDto

beforeEach(() => {
  Object.values(api).forEach((f) => f.mockReset())
  api.getDataset.mockResolvedValue(dataset)
  api.listFiles.mockResolvedValue({ items: [spots], uploadsInProgress: [] })
  api.getPreviewInfo.mockResolvedValue(previewInfo)
  vi.stubGlobal(
    'visualViewport',
    Object.assign(new EventTarget(), {
      ...{ width: 1024, height: 768, scale: 1, offsetLeft: 0, offsetTop: 0 },
    }),
  )
})
afterEach(() => vi.unstubAllGlobals())

async function render() {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push('/datasets/STPL-000001/files/8')
  const wrapper = mount(FileQualityView, {
    props: { idOrAccession: 'STPL-000001', fileId: 8 },
    global: { plugins: [createPinia(), router, vuetify] },
    attachTo: document.body,
  })
  await flushPromises()
  return wrapper
}

describe('the quality page of a table', () => {
  it('names the file and its dataset, and shows the job’s progress while queued or running', async () => {
    api.getQuality.mockResolvedValue(runningReport)
    const wrapper = await render()
    expect(api.getQuality).toHaveBeenCalledWith('STPL-000001', 8)
    expect(wrapper.find('h1').text()).toBe('spots.csv')
    expect(wrapper.text()).toContain('STPL-000001 · Nuclear pores imaged by dSTORM')
    const progress = wrapper.find('[data-testid="quality-progress"]')
    expect(progress.text()).toContain('Computing the quality report: frc · 42 %')
    expect(progress.find('[role="progressbar"]').attributes('aria-valuenow')).toBe('42')
    // No HTML report before the report is done: the button is there, but disabled.
    const download = wrapper.find('[data-testid="download-report"]')
    expect(download.text()).toBe('Download report (HTML)')
    expect(download.attributes('disabled')).toBeDefined()
    expect(download.attributes('href')).toBeUndefined()
    // The preview does not wait for the report.
    expect(wrapper.find('[data-testid="preview-map"]').exists()).toBe(true)
    for (const label of ['Colour by', 'Colormap', 'Brightness', 'Render mode', 'Frames'])
      expect(wrapper.text()).toContain(label)
    expect(wrapper.text()).toContain('Only localizations more precise than … nm')
    expect(wrapper.text()).toContain('Counts per pixel')
    expect(wrapper.text()).toContain('Gaussian, each localization’s precision')
    wrapper.unmount()
  })

  it('says a queued report waits its turn', async () => {
    api.getQuality.mockResolvedValue(queuedReport)
    const wrapper = await render()
    expect(wrapper.text()).toContain('The quality report is waiting its turn.')
    wrapper.unmount()
  })

  it('shows a finished report as cards with verdicts, methods and plots', async () => {
    api.getQuality.mockResolvedValue(doneReport)
    const wrapper = await render()
    const cards = wrapper.find('[data-testid="quality-cards"]')
    expect(cards.findAll('[data-metric]')).toHaveLength(8)
    const precision = cards.find('[data-metric="precision"]')
    expect(precision.text()).toContain('10 nm (median)')
    expect(precision.text()).toContain('As good as the photon counts allow (they predict 9 nm).')
    const frc = cards.find('[data-metric="frc"]')
    expect(frc.text()).toContain('32 nm ± 1.5 nm')
    expect(frc.text()).toContain('7 times finer than the diffraction limit (224.8 nm).')
    expect(frc.text()).toContain('Labelling density, not precision, limits the resolution')
    expect(frc.text()).toContain('Even after merging, molecules that blink again later')
    expect(cards.find('[data-metric="drift"]').text()).toContain(
      'Corrected for this drift, the FRC resolution is 25 nm (28 nm as deposited).',
    )
    // The method and its parameters open from a button.
    const toggle = frc.findAll('button').find((b) => b.text().includes('How it was measured'))!
    const method = frc.find(`#${toggle.attributes('aria-controls')}`)
    expect(toggle.attributes('aria-expanded')).toBe('false')
    expect(method.isVisible()).toBe(false)
    await toggle.trigger('click')
    expect(toggle.attributes('aria-expanded')).toBe('true')
    expect(method.isVisible()).toBe(true)
    expect(method.text()).toContain('Fourier ring correlation of two halves of the acquisition')
    expect(method.text()).toContain('frames per segment')
    const captions = wrapper.findAll('[data-testid="chart"]').map((c) => c.text())
    expect(captions).toHaveLength(4)
    // A finished report downloads as one HTML file from the server's report route.
    const download = wrapper.find('[data-testid="download-report"]')
    expect(download.element.tagName).toBe('A')
    expect(download.attributes('href')).toBe(
      '/api/datasets/STPL-000001/files/8/quality/report.html',
    )
    expect(download.attributes('download')).toBeDefined()
    expect(download.attributes('disabled')).toBeUndefined()
    expect(captions).toContain(
      'The FRC of two halves of the acquisition crosses the 1/7 threshold at 32 nm. Before the correction for repeated localizations: 28 nm as deposited, 24 nm after drift correction.',
    )
    expect(captions.some((c) => c.startsWith('Photons per localization: median 1,500'))).toBe(true)
    wrapper.unmount()
  })

  it('says why a report failed', async () => {
    api.getQuality.mockResolvedValue(failedReport)
    const wrapper = await render()
    const failed = wrapper.find('[data-testid="quality-failed"]')
    expect(failed.text()).toContain('The quality report could not be computed')
    expect(failed.text()).toContain('The localization store could not be read.')
    wrapper.unmount()
  })

  it('tells a reader without the preview right that previews are closed to them', async () => {
    api.getQuality.mockRejectedValue(
      new ApiError({ status: 403, title: 'Forbidden', detail: 'You may not preview this.' }),
    )
    const wrapper = await render()
    expect(wrapper.find('[data-testid="quality-forbidden"]').text()).toContain(
      'The previews of this dataset are not open to you',
    )
    expect(wrapper.find('[data-testid="preview-map"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="download-report"]').exists()).toBe(false)
    wrapper.unmount()
  })

  it('links to the dataset list when there is no such table', async () => {
    api.getQuality.mockRejectedValue(new ApiError({ status: 404, title: 'Not Found' }))
    const wrapper = await render()
    const missing = wrapper.find('[data-testid="quality-missing"]')
    expect(missing.text()).toContain('This table was not found')
    expect(missing.find('a').attributes('href')).toBe('/datasets')
    wrapper.unmount()
  })

  it('shows the server’s words for any other failure', async () => {
    api.getQuality.mockRejectedValue(
      new ApiError({ status: 500, title: 'Server error', detail: 'The database is busy.' }),
    )
    const wrapper = await render()
    expect(wrapper.text()).toContain('The quality report could not be loaded')
    expect(wrapper.text()).toContain('The database is busy.')
    wrapper.unmount()
  })
})

describe('the files list', () => {
  it('links ready localization tables to their quality page', async () => {
    const router = createRouter({ history: createMemoryHistory(), routes })
    const files: DatasetFileDto[] = [
      spots,
      { ...spots, id: 9, name: 'late.csv', status: 'processing' },
      { ...spots, id: 10, name: 'stack.tif', kind: 'raw_stack' },
    ]
    const wrapper = mount(DatasetFilesTable, {
      props: {
        ...{ files, loading: false, error: null, canEdit: false, canDownload: false },
        contentUrl: () => '',
        qualityLink: (fileId: number) => ({
          name: 'file-quality',
          params: { idOrAccession: 'STPL-000001', fileId },
        }),
      },
      global: { plugins: [router, vuetify] },
    })
    const links = wrapper.findAll('a').filter((a) => a.text().includes('Quality and preview'))
    expect(links.map((a) => a.attributes('href'))).toEqual(['/datasets/STPL-000001/files/8'])
    const without = mount(DatasetFilesTable, {
      props: { ...wrapper.props(), qualityLink: undefined },
      global: { plugins: [router, vuetify] },
    })
    expect(without.text()).not.toContain('Quality and preview')
  })
})

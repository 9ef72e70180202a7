import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope, ref } from 'vue'
import { flushPromises, mount } from '@vue/test-utils'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ApiError } from '@/api/client'
import type { DatasetQualityItem } from '@/api/quality'
import DatasetQualitySummary from '@/components/quality/DatasetQualitySummary.vue'
import { DATASET_QUALITY_POLL_MS, useDatasetQuality } from '@/composables/useDatasetQuality'
import vuetify from '@/plugins/vuetify'
import { routes } from '@/router/routes'

const api = vi.hoisted(() => ({ getDatasetQuality: vi.fn() }))
vi.mock('@/api/quality', () => ({ getDatasetQuality: api.getDatasetQuality }))

/** Made-up rows shaped like GET /api/datasets/:id/quality. */
const done: DatasetQualityItem = {
  ...{ fileId: 8, fileName: 'spots.csv', status: 'done', progress: 1, message: null },
  ...{ computedAt: '2026-03-01T10:00:00Z', localizations: 1_250_000, precisionMedianNm: 10.04 },
  ...{ frcResolutionNm: 32.26, driftNm: 45 },
  verdicts: [
    {
      key: 'precision',
      title: 'Precision',
      tone: 'good',
      text: 'As good as the photon counts allow.',
    },
    { key: 'frc', title: 'Resolution', tone: 'fair', text: 'Labelling density limits it.' },
    { key: 'drift', title: 'Drift', tone: 'poor', text: 'Uncorrected, it blurs the image.' },
  ],
}
const empty = {
  ...{ computedAt: null, localizations: null, precisionMedianNm: null, frcResolutionNm: null },
  ...{ driftNm: null, verdicts: [] },
}
const running: DatasetQualityItem = {
  ...empty,
  ...{ fileId: 9, fileName: 'later.csv', status: 'running', progress: 0.42, message: 'frc' },
}
const failed: DatasetQualityItem = {
  ...empty,
  ...{ fileId: 10, fileName: 'broken.csv', status: 'failed', progress: 0 },
  message: 'The localization store could not be read.',
}

function render(props: Partial<InstanceType<typeof DatasetQualitySummary>['$props']> = {}) {
  const router = createRouter({ history: createMemoryHistory(), routes })
  return mount(DatasetQualitySummary, {
    props: {
      ...{ items: [done, running, failed], loaded: true, error: null },
      link: (fileId: number) => ({
        name: 'file-quality',
        params: { idOrAccession: 'STPL-000001', fileId },
      }),
      ...props,
    },
    global: { plugins: [router, vuetify] },
  })
}

describe('the quality summary of a dataset', () => {
  it('shows each table’s numbers and links it to its quality page', () => {
    const wrapper = render()
    const row = wrapper.find('[data-file="8"]')
    expect(row.find('a').attributes('href')).toBe('/datasets/STPL-000001/files/8')
    expect(row.find('a').text()).toBe('spots.csv')
    const number = (key: string) => row.find(`[data-number="${key}"]`).text()
    expect(number('localizations')).toBe('Localizations1,250,000')
    expect(number('precision')).toBe('Precision (median)10 nm')
    expect(number('frc')).toBe('FRC resolution32.3 nm')
    expect(number('drift')).toBe('Driftup to 45 nm')
  })

  it('shows the verdicts as chips that name the aspect and the tone, and say why', () => {
    const chips = render().find('[data-file="8"]').findAll('[data-verdict]')
    expect(chips.map((c) => [c.attributes('data-verdict'), c.attributes('data-tone')])).toEqual([
      ['precision', 'good'],
      ['frc', 'fair'],
      ['drift', 'poor'],
    ])
    expect(chips.map((c) => c.text())).toEqual([
      'Precision: Good',
      'Resolution: Worth a look',
      'Drift: A problem',
    ])
    // Colour is never alone: the tone is in the words, and the reason reaches screen readers.
    expect(chips[2]!.attributes('aria-label')).toBe(
      'Drift: A problem. Uncorrected, it blurs the image.',
    )
    expect(chips[2]!.attributes('tabindex')).toBe('0')
  })

  it('says where a report stands when it is not done, without numbers', () => {
    const wrapper = render()
    const later = wrapper.find('[data-file="9"]')
    expect(later.find('[data-status="running"]').text()).toBe('Computing the report · 42 %')
    expect(later.find('[data-number]').exists()).toBe(false)
    expect(wrapper.find('[data-file="10"] [data-status="failed"]').text()).toBe(
      'No report: The localization store could not be read.',
    )
  })

  it('has a loading, an empty and an error state', async () => {
    expect(render({ items: [], loaded: false }).find('.v-skeleton-loader').exists()).toBe(true)
    expect(render({ items: [] }).find('[data-testid="quality-empty"]').text()).toContain(
      'No localization tables yet',
    )
    const failing = render({ items: [], error: 'The database is busy.' })
    expect(failing.text()).toContain('The quality summary could not be loaded')
    expect(failing.text()).toContain('The database is busy.')
    await failing
      .findAll('button')
      .find((b) => b.text() === 'Try again')!
      .trigger('click')
    expect(failing.emitted('retry')).toHaveLength(1)
  })
})

describe('loading the summary', () => {
  beforeEach(() => {
    vi.useFakeTimers()
    api.getDatasetQuality.mockReset()
  })
  afterEach(() => vi.useRealTimers())

  it('asks only while enabled, again while a report is computed, and when the files change', async () => {
    api.getDatasetQuality
      .mockResolvedValueOnce({ items: [running] })
      .mockResolvedValue({ items: [done] })
    const enabled = ref(false)
    const files = ref('8:ready')
    const scope = effectScope()
    const q = scope.run(() => useDatasetQuality(3, enabled, files))!
    await vi.advanceTimersByTimeAsync(0)
    expect(api.getDatasetQuality).not.toHaveBeenCalled()
    enabled.value = true
    await vi.advanceTimersByTimeAsync(0)
    expect(api.getDatasetQuality).toHaveBeenCalledWith(3)
    expect(q.pending.value).toBe(true)
    await vi.advanceTimersByTimeAsync(DATASET_QUALITY_POLL_MS)
    expect(q.items.value).toEqual([done])
    expect(q.loaded.value).toBe(true)
    await vi.advanceTimersByTimeAsync(DATASET_QUALITY_POLL_MS * 4)
    expect(api.getDatasetQuality).toHaveBeenCalledTimes(2)
    files.value = '8:ready,11:processing'
    await vi.advanceTimersByTimeAsync(0)
    expect(api.getDatasetQuality).toHaveBeenCalledTimes(3)
    scope.stop()
  })

  it("hands on the tables' median fitted PSF width, null until one is known", async () => {
    api.getDatasetQuality.mockResolvedValue({ items: [done], psfSigmaMedianNm: 128.5 })
    const scope = effectScope()
    const q = scope.run(() => useDatasetQuality(3, true))!
    expect(q.psfSigmaMedianNm.value).toBeNull()
    await flushPromises()
    expect(q.psfSigmaMedianNm.value).toBe(128.5)
    scope.stop()
  })

  it('keeps the server’s words when a request fails', async () => {
    api.getDatasetQuality.mockRejectedValue(
      new ApiError({ status: 500, title: 'Server error', detail: 'The database is busy.' }),
    )
    const scope = effectScope()
    const q = scope.run(() => useDatasetQuality(3, true))!
    await flushPromises()
    expect(q.error.value).toBe('The database is busy.')
    expect(q.items.value).toEqual([])
    scope.stop()
  })
})

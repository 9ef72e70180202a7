import { describe, expect, it, vi, beforeEach } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import RegionMeasurements from '@/components/regions/RegionMeasurements.vue'
import vuetify from '@/plugins/vuetify'
import type { MeasurementResult } from '@shared/schemas/region-measurement.schema'

const api = vi.hoisted(() => ({ getRegionMeasurement: vi.fn() }))
vi.mock('@/api/regionMeasurements', () => ({ getRegionMeasurement: api.getRegionMeasurement }))

/** Made-up answers shaped like GET /api/regions/:id/measurements. */
const profile: MeasurementResult = {
  kind: 'profile',
  ...{
    count: 5120,
    areaNm2: 2.4e5,
    computeMs: 48,
    cached: false,
    binNm: 5,
    lengthNm: 600,
    widthNm: 400,
  },
  ...{
    positions: [2.5, 7.5],
    counts: [3, 4],
    fitted: [3, 4],
    background: 0.4,
    fwhmInterpolated: 31,
  },
  peaks: [
    { position: 270, sigma: 10.2, fwhm: 24.02, height: 120 },
    { position: 330.5, sigma: 9.9, fwhm: 23.31, height: 110 },
  ],
  peakSeparation: 60.5,
}

const render = (geometryType: 'LineString' | 'Polygon' | 'Point') =>
  mount(RegionMeasurements, {
    props: { regionId: 7, geometryType },
    global: { plugins: [vuetify], stubs: { QualityChart: true } },
  })

beforeEach(() => api.getRegionMeasurement.mockReset())

describe('the Measure panel of a region', () => {
  it('a line starts on its profile and shows each peak’s FWHM and their separation', async () => {
    api.getRegionMeasurement.mockResolvedValue(profile)
    const w = render('LineString')
    expect(w.text()).toContain('Choose what to measure')
    await w
      .findAll('button')
      .find((b) => b.text() === 'Measure')!
      .trigger('click')
    await flushPromises()
    expect(api.getRegionMeasurement).toHaveBeenCalledWith(7, { kind: 'profile', binNm: 5 })
    expect(w.text()).toContain('5,120 localizations')
    expect(w.text()).toContain('FWHM 24.0 nm')
    expect(w.text()).toContain('Peak separation')
    expect(w.text()).toContain('60.5 nm')
  })

  it('a polygon offers no profile; DBSCAN sends eps and minPts and says minPts counts the point', async () => {
    api.getRegionMeasurement.mockResolvedValue({
      kind: 'dbscan',
      ...{ count: 900, areaNm2: 1e6, computeMs: 12, cached: true, eps: 20, minPts: 5, noise: 40 },
      convention: 'minPts counts the localization itself.',
      clusters: [{ size: 860, area: 31_400, centroid: [510, 490], hull: [] }],
    } satisfies MeasurementResult)
    const w = render('Polygon')
    expect(w.findAll('button').map((b) => b.text())).not.toContain('Profile')
    await w
      .findAll('button')
      .find((b) => b.text() === 'Clusters')!
      .trigger('click')
    expect(w.text()).toContain('the localization itself counts')
    await w
      .findAll('button')
      .find((b) => b.text() === 'Measure')!
      .trigger('click')
    await flushPromises()
    expect(api.getRegionMeasurement).toHaveBeenCalledWith(7, { kind: 'dbscan', eps: 20, minPts: 5 })
    expect(w.text()).toContain('1 clusters, outlined on the preview; 40 localizations in none')
    // The clusters go to the preview to be outlined there.
    expect(w.emitted('clusters')).toEqual([
      [[{ size: 860, area: 31_400, centroid: [510, 490], hull: [] }]],
    ])
    expect(w.text()).toContain('kept from an earlier measurement')
  })
})

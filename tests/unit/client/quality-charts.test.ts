import { describe, expect, it } from 'vitest'
import {
  frcOption,
  frequencyLabel,
  histogramOption,
  stepPoints,
  type ChartInk,
} from '@shared/domain/quality-charts'
import { qualityPlots } from '@shared/domain/quality-plots'
import { frcValue } from '@shared/domain/quality-values'
import { colourByChoices, channelChoices } from '@/utils/previewOptions'
import { doneReport, previewInfo } from '../../fixtures/quality-report'

const ink: ChartInk = { quiet: '#888888', label: '#111111' }

describe('the quality plots', () => {
  // A histogram's bins are half-open [edge i, edge i+1): the step line holds each count from its
  // left edge to the next, and closes at the last edge (definition of a histogram).
  it('draws a histogram from its edges and counts', () => {
    expect(stepPoints([0, 5, 10, 15], [2, 7, 1])).toEqual([
      [0, 2],
      [5, 7],
      [10, 1],
      [15, 1],
    ])
    expect(stepPoints([0], [])).toEqual([])
  })

  // The demo's photon histogram ran from 414.841 to 5 219.6 and its edge labels were drawn over the
  // round ticks beside them ("145147.902" on the PSF plot); the median read "1,501.962".
  it('labels a histogram with round ticks only, and its median to four figures', () => {
    const option = histogramOption(
      ink,
      {
        edges: [414.841, 1000, 2000, 5219.6],
        counts: [3, 9, 2],
        median: 1501.962,
        lowerQuartile: 1068.7,
        upperQuartile: 2102.1,
        mean: 1640.2,
      },
      'photons',
    )
    const xAxis = option.xAxis as { min: number; max: number; axisLabel: Record<string, unknown> }
    expect([xAxis.min, xAxis.max]).toEqual([414.841, 5219.6])
    expect(xAxis.axisLabel).toMatchObject({ showMinLabel: false, showMaxLabel: false })
    const series = Array.isArray(option.series) ? option.series : []
    const mark = series[0]?.markLine?.data?.[0] as { label: { formatter: string } }
    expect(mark.label.formatter).toBe('median 1,502')
  })

  // DOMAIN.md §1.4 [S]: L = 1024, 5 nm pixels, ring 160 → q = 160/5120 = 0.03125 /nm, i.e. 32 nm.
  it('reads a spatial frequency as the length it resolves', () => {
    expect(frequencyLabel(160 / (1024 * 5))).toBe('0.031 /nm (32 nm)')
  })

  it('marks the 1/7 threshold and the resolution on the FRC curve', () => {
    const frc = frcValue(doneReport.metrics.frc)!
    const option = frcOption(ink, frc, null)
    const series = Array.isArray(option.series) ? option.series : []
    expect(series.map((s) => s.name)).toEqual([
      'FRC',
      'smoothed',
      'corrected for repeated localizations',
    ])
    const marks = series[1]?.markLine?.data ?? []
    // FRC threshold 1/7 = 0.142857 (DOMAIN.md §5 [C]); 32 nm sits at 1/32 /nm.
    expect(marks).toEqual([
      expect.objectContaining({ yAxis: 1 / 7 }),
      expect.objectContaining({ xAxis: 1 / 32 }),
    ])
    // The reference lines take the caller's ink: light on the page, dark in the printed report.
    expect(series[1]?.markLine?.lineStyle?.color).toBe('#888888')
    expect(series[1]?.markLine?.label?.color).toBe('#111111')
    expect(series[0]?.color).toBe('#888888')
  })

  it('draws every curve the report has, with the drift-corrected FRC beside the FRC', () => {
    const plots = qualityPlots(doneReport, ink)
    expect(plots.map((p) => p.key)).toEqual(['photons', 'precision', 'frc', 'drift'])
    const frc = plots.find((p) => p.key === 'frc')!.option
    const names = (Array.isArray(frc.series) ? frc.series : []).map((s) => s.name)
    expect(names).toContain('after drift correction')
    const withoutMetrics = qualityPlots({ ...doneReport, metrics: {}, drift: null }, ink)
    expect(withoutMetrics).toEqual([])
  })

  it('leaves out a metric whose value has another shape', () => {
    const odd = { ...doneReport.metrics.photons!, value: { edges: 'none' } }
    const plots = qualityPlots(
      { ...doneReport, metrics: { ...doneReport.metrics, photons: odd } },
      ink,
    )
    expect(plots.map((p) => p.key)).not.toContain('photons')
  })
})

describe('the viewer’s choices a table allows', () => {
  it('offers depth only with z, time with frames, the overlay with two channels', () => {
    const titles = (info: typeof previewInfo) => colourByChoices(info).map((c) => c.title)
    expect(titles(previewInfo)).toEqual(['Density', 'Time (frame)', 'Two channels overlaid'])
    expect(
      titles({ ...previewInfo, zRangeNm: { min: -300, max: 300 }, frames: null, channels: [0] }),
    ).toEqual(['Density', 'Depth (z)'])
    expect(channelChoices(previewInfo).map((c) => c.title)).toEqual([
      'All channels',
      'Channel 0',
      'Channel 1',
    ])
  })
})

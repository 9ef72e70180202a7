import type {
  NnMeasurement,
  ProfileMeasurement,
  RipleyMeasurement,
} from '../schemas/region-measurement.schema'
import type { ChartOption } from './quality-charts'

/**
 * Chart options of the region measurements (line series only, like the quality charts): Ripley's
 * H = L − r with the CSR envelope as a band, the nearest-neighbour histogram, the line profile
 * with its fit.
 */

const axis = (name: string) => ({
  type: 'value' as const,
  name,
  nameLocation: 'middle' as const,
  nameGap: 30,
})
const grid = { left: 56, right: 16, top: 32, bottom: 44 }
const round = (v: number) => Math.round(v * 100) / 100

export function ripleyChart(m: RipleyMeasurement): ChartOption {
  const pairs = (values: number[]) => m.r.map((r, j) => [r, round(values[j]! - r)])
  const series: ChartOption['series'] = [
    { name: 'L(r) − r', type: 'line', data: pairs(m.L), showSymbol: false, z: 3 },
  ]
  if (m.envelope) {
    const low = m.envelope.low
    const high = m.envelope.high
    series.push(
      {
        name: 'CSR envelope',
        type: 'line',
        stack: 'envelope',
        data: pairs(low),
        lineStyle: { opacity: 0 },
        showSymbol: false,
      },
      {
        name: 'CSR envelope',
        type: 'line',
        stack: 'envelope',
        data: m.r.map((r, j) => [r, round(high[j]! - low[j]!)]),
        lineStyle: { opacity: 0 },
        areaStyle: { opacity: 0.3 },
        showSymbol: false,
      },
    )
  }
  return {
    grid,
    tooltip: { trigger: 'axis' },
    legend: { data: ['L(r) − r', 'CSR envelope'] },
    xAxis: axis('r (nm)'),
    yAxis: axis('L(r) − r (nm)'),
    series,
  }
}

export function nearestNeighbourChart(m: NnMeasurement): ChartOption {
  return {
    grid,
    tooltip: { trigger: 'axis' },
    xAxis: axis('distance to the nearest neighbour (nm)'),
    yAxis: axis('localizations'),
    series: [
      {
        name: 'localizations',
        type: 'line',
        step: 'middle',
        areaStyle: { opacity: 0.3 },
        showSymbol: false,
        data: m.counts.map((c, b) => [round((m.edges[b]! + m.edges[b + 1]!) / 2), c]),
      },
    ],
  }
}

export function profileChart(m: ProfileMeasurement): ChartOption {
  return {
    grid,
    tooltip: { trigger: 'axis' },
    legend: { data: ['localizations', 'fit'] },
    xAxis: axis('position along the line (nm)'),
    yAxis: axis(`localizations per ${m.binNm} nm`),
    series: [
      {
        name: 'localizations',
        type: 'line',
        step: 'middle',
        areaStyle: { opacity: 0.25 },
        showSymbol: false,
        data: m.positions.map((p, b) => [round(p), m.counts[b]!]),
      },
      {
        name: 'fit',
        type: 'line',
        smooth: true,
        showSymbol: false,
        data: m.positions.map((p, b) => [round(p), round(m.fitted[b]!)]),
      },
    ],
  }
}

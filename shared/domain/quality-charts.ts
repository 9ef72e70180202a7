import type { LineSeriesOption } from 'echarts/charts'
import type {
  GridComponentOption,
  LegendComponentOption,
  MarkLineComponentOption,
  TooltipComponentOption,
} from 'echarts/components'
import type { ComposeOption } from 'echarts/core'
import type { DistributionValue, DriftTrace, FrcValue, PerFrameValue } from './quality-values'
import { lengthText } from './quality-verdicts'

/**
 * The options of the quality charts, drawn by the browser's page and by the server's HTML report:
 * line series only, so one chart type is bundled.
 */
export type ChartOption = ComposeOption<
  | LineSeriesOption
  | GridComponentOption
  | LegendComponentOption
  | MarkLineComponentOption
  | TooltipComponentOption
>

/**
 * The few colours the options set themselves (the rest comes from the renderer's theme): the
 * page draws light on dark, the printable report dark on white.
 */
export interface ChartInk {
  /** Reference lines and the raw, unsmoothed curve. */
  quiet: string
  /** Labels on reference lines. */
  label: string
}

const fmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 3 })
/** A median read off a plot: four figures say as much as its bins can (1 502, 130, 3.83). */
const figures = new Intl.NumberFormat(undefined, { maximumSignificantDigits: 4 })

/**
 * An axis that ends where the data end: the end values (often ragged, 7.7498, 499.5) are not
 * labelled, since the renderer prints them beside the round ticks and the two collide.
 */
const dataBounds = (min: number | 'dataMin', max: number | 'dataMax') => ({
  min,
  max,
  axisLabel: {
    formatter: (value: number) => fmt.format(value),
    showMinLabel: false,
    showMaxLabel: false,
  },
})

const valueAxis = (name: string, extra: Record<string, unknown> = {}) => ({
  type: 'value' as const,
  name,
  nameLocation: 'middle' as const,
  nameGap: 34,
  ...extra,
})
const yAxis = (name: string) => valueAxis(name, { nameGap: 48, scale: false })
const grid = { left: 64, right: 24, top: 36, bottom: 52 }
const line = (name: string, data: [number, number][], extra: LineSeriesOption = {}) =>
  ({ type: 'line', name, data, symbol: 'none', ...extra }) satisfies LineSeriesOption
const markLine = (ink: ChartInk, data: NonNullable<MarkLineComponentOption['data']>) => ({
  symbol: 'none',
  silent: true,
  lineStyle: { type: 'dashed' as const, color: ink.quiet },
  label: { color: ink.label },
  data,
})

/**
 * A histogram as a filled step line: from each bin's left edge the line holds the bin's count
 * until the next edge, and the last bin closes at the last edge.
 */
export function stepPoints(edges: number[], counts: number[]): [number, number][] {
  const points: [number, number][] = []
  for (let i = 0; i < counts.length; i++) points.push([edges[i] ?? 0, counts[i] ?? 0])
  const last = counts[counts.length - 1]
  const end = edges[counts.length]
  if (last !== undefined && end !== undefined) points.push([end, last])
  return points
}

export function histogramOption(
  ink: ChartInk,
  d: DistributionValue,
  axisTitle: string,
  unit = '',
): ChartOption {
  const median = `median ${figures.format(d.median)}${unit ? ` ${unit}` : ''}`
  return {
    grid,
    tooltip: { trigger: 'axis' },
    // The axis runs from the first bin edge to the last, whatever their digits.
    xAxis: valueAxis(axisTitle, dataBounds(d.edges[0] ?? 0, d.edges[d.edges.length - 1] ?? 0)),
    yAxis: yAxis('localizations'),
    series: [
      line('localizations', stepPoints(d.edges, d.counts), {
        step: 'end',
        areaStyle: { opacity: 0.4 },
        lineStyle: { width: 1 },
        markLine: markLine(ink, [{ xAxis: d.median, label: { formatter: median } }]),
      }),
    ],
  }
}

const zip = (x: number[], y: number[]): [number, number][] =>
  y.map((value, i) => [x[i] ?? 0, value])

/** FRC against spatial frequency, with the threshold and the resolution where it is crossed. */
export function frcOption(
  ink: ChartInk,
  frc: FrcValue,
  driftCorrected: FrcValue | null,
): ChartOption {
  const q = frc.curve.frequencyPerNm
  const marks: NonNullable<MarkLineComponentOption['data']> = [
    { yAxis: frc.threshold, label: { formatter: '1/7 threshold', position: 'insideEndTop' } },
  ]
  if (frc.resolutionNm)
    marks.push({
      xAxis: 1 / frc.resolutionNm,
      label: { formatter: `FRC ${lengthText(frc.resolutionNm)}`, position: 'insideEndTop' },
    })
  const series: LineSeriesOption[] = [
    line('FRC', zip(q, frc.curve.frc), {
      lineStyle: { width: 1, opacity: 0.45 },
      color: ink.quiet,
    }),
    line('smoothed', zip(q, frc.curve.smoothed), { markLine: markLine(ink, marks) }),
  ]
  if (frc.curve.corrected)
    series.push(line('corrected for repeated localizations', zip(q, frc.curve.corrected)))
  const after = driftCorrected?.curve
  if (after)
    series.push(
      line('after drift correction', zip(after.frequencyPerNm, after.smoothed), {
        lineStyle: { type: 'dashed' },
      }),
    )
  return {
    grid: { ...grid, top: 56 },
    legend: { top: 4 },
    tooltip: { trigger: 'axis' },
    xAxis: valueAxis('spatial frequency (1/nm)', {
      min: 0,
      max: q[q.length - 1],
      axisPointer: {
        label: { formatter: ({ value }: { value: unknown }) => frequencyLabel(Number(value)) },
      },
    }),
    yAxis: yAxis('FRC'),
    series,
  }
}

/** A spatial frequency with the length it stands for. */
export const frequencyLabel = (q: number) =>
  q > 0 ? `${fmt.format(q)} /nm (${lengthText(1 / q)})` : `${fmt.format(q)} /nm`

export function perFrameOption(p: PerFrameValue): ChartOption {
  return {
    grid,
    tooltip: { trigger: 'axis' },
    xAxis: valueAxis('frame', dataBounds('dataMin', 'dataMax')),
    yAxis: yAxis('localizations per frame'),
    series: [line('localizations per frame', zip(p.startFrame, p.meanPerFrame))],
  }
}

export function driftOption(t: DriftTrace): ChartOption {
  return {
    grid: { ...grid, top: 48 },
    legend: { top: 4 },
    tooltip: { trigger: 'axis' },
    xAxis: valueAxis('frame', dataBounds('dataMin', 'dataMax')),
    yAxis: yAxis('drift (nm)'),
    series: [
      line('x', zip(t.frame, t.x), { symbol: 'circle', symbolSize: 4 }),
      line('y', zip(t.frame, t.y), { symbol: 'circle', symbolSize: 4 }),
    ],
  }
}

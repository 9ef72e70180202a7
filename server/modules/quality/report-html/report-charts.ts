import { LineChart } from 'echarts/charts'
import {
  GridComponent,
  LegendComponent,
  MarkLineComponent,
  TooltipComponent,
} from 'echarts/components'
import { init, registerTheme, use } from 'echarts/core'
import { SVGRenderer } from 'echarts/renderers'
import type { ChartInk, ChartOption } from '@shared/domain/quality-charts'
import { qualityPlots } from '@shared/domain/quality-plots'
import type { QualityReportDto } from '@shared/schemas/quality.schema'

// The quality page's chart kinds (src/components/quality/QualityChart.vue), drawn as SVG.
use([LineChart, GridComponent, LegendComponent, MarkLineComponent, TooltipComponent, SVGRenderer])

/** Dark ink on white paper: the page's charts are light on dark, which prints badly. */
const INK = '#1d2731'
const FAINT = '#4b5563'
export const PRINT_INK: ChartInk = { quiet: '#8a94a0', label: INK }
const axis = {
  axisLine: { lineStyle: { color: '#9aa3ad' } },
  axisTick: { lineStyle: { color: '#9aa3ad' } },
  axisLabel: { color: FAINT },
  splitLine: { lineStyle: { color: '#e5e7eb' } },
  nameTextStyle: { color: INK, fontWeight: 'bold' },
}
const PRINT_THEME = 'stipple-print'
registerTheme(PRINT_THEME, {
  // The app's amber, darkened to read on white, then an azure that stays apart from it.
  color: ['#c0661a', '#2f7fc1', '#3f8f4a', '#a8558c'],
  backgroundColor: '#ffffff',
  // Without a canvas, ECharts lays text out with Arial's widths: draw it in Arial or a font of
  // the same metrics (Liberation Sans), so legends and labels do not run into each other. No
  // quotes: ECharts writes the family into a double-quoted style attribute as it is.
  textStyle: { color: INK, fontFamily: 'Arial, Helvetica, Liberation Sans, sans-serif' },
  legend: { textStyle: { color: INK } },
  valueAxis: axis,
})

export const CHART_WIDTH = 680
export const CHART_HEIGHT = 280

/** One chart as an SVG document, rendered on the server by ECharts without a DOM. */
export function chartSvg(option: ChartOption, width = CHART_WIDTH, height = CHART_HEIGHT): string {
  const chart = init(null, PRINT_THEME, { renderer: 'svg', ssr: true, width, height })
  try {
    chart.setOption({ ...option, animation: false })
    return chart.renderToSVGString()
  } finally {
    chart.dispose()
  }
}

export interface RenderedPlot {
  key: string
  title: string
  caption: string
  svg: string
}

/** The report's plots, with the same options and captions as the quality page. */
export function renderedPlots(report: QualityReportDto): RenderedPlot[] {
  return qualityPlots(report, PRINT_INK).map((plot) => ({
    key: plot.key,
    title: plot.title,
    caption: plot.caption,
    svg: chartSvg(plot.option),
  }))
}

import { SHELL, lightTheme } from '@/plugins/theme'
import type { ChartInk } from '@shared/domain/quality-charts'

/**
 * The charts' colours: the slate of the app's bar behind light ink, the app's amber first, then
 * an azure that stays apart from it for colour-blind readers, and two quieter tones.
 */
const INK = 'rgba(255, 255, 255, 0.87)'
const FAINT = 'rgba(255, 255, 255, 0.6)'
const RULE = 'rgba(255, 255, 255, 0.3)'
const GRID = 'rgba(255, 255, 255, 0.08)'

export const CHART_COLORS = {
  background: SHELL.bar,
  primary: lightTheme.colors?.primary ?? '#e08a3c',
  secondary: '#62a8e0',
  tertiary: '#9bd39f',
  quiet: 'rgba(255, 255, 255, 0.45)',
}

/** What the shared chart options draw themselves, light on the page's dark charts. */
export const CHART_INK: ChartInk = { quiet: CHART_COLORS.quiet, label: INK }

const axis = {
  axisLine: { lineStyle: { color: RULE } },
  axisTick: { lineStyle: { color: RULE } },
  axisLabel: { color: FAINT },
  splitLine: { lineStyle: { color: GRID } },
  nameTextStyle: { color: INK, fontWeight: 'bold' },
}

export const chartTheme = {
  color: [CHART_COLORS.primary, CHART_COLORS.secondary, CHART_COLORS.tertiary, '#d58fbf'],
  backgroundColor: CHART_COLORS.background,
  textStyle: { color: INK, fontFamily: 'Lato, system-ui, sans-serif' },
  legend: { textStyle: { color: INK } },
  tooltip: {
    backgroundColor: SHELL.drawer,
    borderColor: RULE,
    textStyle: { color: INK },
  },
  valueAxis: axis,
  categoryAxis: axis,
}

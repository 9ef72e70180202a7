import type { QualityReportDto } from '../schemas/quality.schema'
import {
  driftOption,
  frcOption,
  histogramOption,
  perFrameOption,
  type ChartInk,
  type ChartOption,
} from './quality-charts'
import {
  distributionValue,
  driftValue,
  frcValue,
  metricOf,
  perFrameValue,
  precisionValue,
  type DistributionValue,
} from './quality-values'
import { lengthText } from './quality-verdicts'

/** One plot of the quality page, with a caption that says what it shows in words. */
export interface QualityPlot {
  key: string
  title: string
  option: ChartOption
  caption: string
}

const fmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 })

/** The columns drawn as histograms: their metric, the axis title and the unit. */
const HISTOGRAMS = [
  { key: 'photons', title: 'Photons per localization', axis: 'photons', unit: '' },
  { key: 'background', title: 'Background', axis: 'background (photons per pixel)', unit: '' },
  { key: 'sigma', title: 'PSF width', axis: 'PSF standard deviation (nm)', unit: 'nm' },
  { key: 'z', title: 'Depth', axis: 'z (nm)', unit: 'nm' },
]

function quartiles(d: DistributionValue, unit: string): string {
  const u = unit ? ` ${unit}` : ''
  return (
    `median ${fmt.format(d.median)}${u}, half of the localizations between ` +
    `${fmt.format(d.lowerQuartile)} and ${fmt.format(d.upperQuartile)}${u}`
  )
}

function histogramPlots(report: QualityReportDto, ink: ChartInk): QualityPlot[] {
  const plots: QualityPlot[] = []
  for (const h of HISTOGRAMS) {
    const d = distributionValue(metricOf(report, h.key))
    if (d)
      plots.push({
        key: h.key,
        title: h.title,
        option: histogramOption(ink, d, h.axis, h.unit),
        caption: `${h.title}: ${quartiles(d, h.unit)}.`,
      })
  }
  const precision = precisionValue(metricOf(report, 'precision'))
  if (precision)
    plots.splice(1, 0, {
      key: 'precision',
      title: 'Localization precision',
      option: histogramOption(ink, precision.distribution, 'localization precision (nm)', 'nm'),
      caption:
        `Localization precision ${precision.source === 'expected from photons' ? 'expected from the photon counts' : 'from the uncertainty column'}: ` +
        `${quartiles(precision.distribution, 'nm')}.`,
    })
  return plots
}

function frcPlot(report: QualityReportDto, ink: ChartInk): QualityPlot | null {
  const frc = frcValue(metricOf(report, 'frc'))
  if (!frc) return null
  const corrected = frcValue(metricOf(report, 'frcDriftCorrected'))
  const crossing = frc.resolutionNm
    ? `crosses the 1/7 threshold at ${lengthText(frc.resolutionNm)}`
    : 'does not cross the 1/7 threshold'
  // Like for like with the drift card: both before the repeat correction, whose Q drift spoils.
  const after =
    frc.resolutionUncorrectedNm && corrected?.resolutionUncorrectedNm
      ? ` Before the correction for repeated localizations: ${lengthText(frc.resolutionUncorrectedNm)} as deposited, ${lengthText(corrected.resolutionUncorrectedNm)} after drift correction.`
      : ''
  return {
    key: 'frc',
    title: 'Fourier ring correlation',
    option: frcOption(ink, frc, corrected),
    caption: `The FRC of two halves of the acquisition ${crossing}.${after}`,
  }
}

/** Every plot the report has data for, histograms first, then the curves over the run. */
export function qualityPlots(report: QualityReportDto, ink: ChartInk): QualityPlot[] {
  const plots = histogramPlots(report, ink)
  const frc = frcPlot(report, ink)
  if (frc) plots.push(frc)
  const perFrame = perFrameValue(metricOf(report, 'perFrame'))
  if (perFrame)
    plots.push({
      key: 'perFrame',
      title: 'Localizations per frame',
      option: perFrameOption(perFrame),
      caption: 'Localizations per frame over the acquisition (activation and bleaching).',
    })
  const trace = report.drift ?? driftValue(metricOf(report, 'drift'))?.trajectory ?? null
  if (trace && trace.frame.length)
    plots.push({
      key: 'drift',
      title: 'Drift',
      option: driftOption(trace),
      caption: `Drift in x and y over the frames, largest ${lengthText(report.driftNm)} from the first frame.`,
    })
  return plots
}

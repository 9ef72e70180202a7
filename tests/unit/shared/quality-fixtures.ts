import type { PreviewInfo } from '@shared/schemas/preview.schema'
import type { QualityReportDto } from '@shared/schemas/quality.schema'

/** Made-up API answers shaped like the server's quality report and preview description. */

const distribution = (edges: number[], counts: number[], median: number) => ({
  count: counts.reduce((a, b) => a + b, 0),
  mean: median,
  lowerQuartile: median * 0.8,
  median,
  upperQuartile: median * 1.2,
  edges,
  counts,
})

const frcCurve = {
  frequencyPerNm: [0, 0.01, 0.02, 0.03, 0.04, 0.05],
  frc: [1, 0.8, 0.4, 0.12, 0.05, 0.01],
  smoothed: [1, 0.78, 0.42, 0.14, 0.05, 0.02],
  corrected: [1, 0.75, 0.38, 0.1, 0.03, 0.01],
  pixelsInRing: [1, 6, 12, 18, 25, 31],
}

const frcValue = (resolutionNm: number, resolutionUncorrectedNm = 28) => ({
  resolutionNm,
  resolutionUncorrectedNm,
  spreadNm: 1.5,
  localizationsPerEmitter: 4.2,
  threshold: 1 / 7,
  curve: frcCurve,
})

export const doneReport: QualityReportDto = {
  status: 'done',
  progress: 1,
  message: null,
  computedAt: '2026-03-01T10:00:00Z',
  localizations: 1_250_000,
  frames: 20_000,
  photonsMedian: 1500,
  precisionMedianNm: 10,
  expectedPrecisionNm: 9,
  nenaPrecisionNm: 11,
  frcResolutionNm: 32,
  frcResolutionUncorrectedNm: 28,
  frcDriftCorrectedNm: 25,
  localizationsPerEmitter: 4.2,
  nyquistResolutionNm: 40,
  diffractionLimitNm: 224.8,
  driftNm: 45,
  drift: { frame: [500, 1500, 2500], x: [0, 20, 40], y: [0, -10, -20] },
  mergedEmitters: 300_000,
  error: null,
  metrics: {
    summary: { value: { count: 1_250_000 }, method: 'counts', parameters: {} },
    photons: {
      value: distribution([0, 1000, 2000, 3000], [10, 30, 5], 1500),
      method: 'Histogram over a percentile range',
      parameters: { bins: 100 },
    },
    precision: {
      value: {
        source: 'uncertainty column',
        medianNm: 10,
        distribution: distribution([0, 5, 10, 15, 20], [1, 20, 10, 2], 10),
        expectedMedianNm: 9,
        expectedFormula: 'Mortensen, least squares',
        measuredToExpected: 10 / 9,
      },
      method: 'Median of the uncertainty column',
      parameters: {},
    },
    nena: { value: { precisionNm: 11 }, method: 'NeNA', parameters: { searchRadiusNm: 150 } },
    merge: {
      value: { events: 300_000, localizationsPerEvent: { mean: 4.2, median: 3 } },
      method: 'Frame-by-frame linking',
      parameters: { radiusNm: 25 },
    },
    frc: {
      value: frcValue(32),
      method: 'Fourier ring correlation of two halves of the acquisition',
      parameters: { pixelNm: 5, blocks: 50, framesPerSegment: 1000 },
    },
    frcDriftCorrected: {
      value: frcValue(25, 24),
      method: 'Fourier ring correlation of two halves of the acquisition',
      parameters: {},
    },
    drift: {
      value: {
        trajectory: { frame: [500, 1500, 2500], x: [0, 20, 40], y: [0, -10, -20] },
        totalDriftNm: 45,
      },
      method: 'Redundant cross-correlation',
      parameters: { segments: 20 },
    },
    density: {
      value: {
        countingUnit: 'raw localizations',
        occupiedAreaUm2: 400,
        densityPerUm2: 3125,
        nyquistResolutionNm: 35.8,
      },
      method: 'Lateral density',
      parameters: {},
    },
    densityMerged: {
      value: {
        countingUnit: 'merged events',
        occupiedAreaUm2: 400,
        densityPerUm2: 2500,
        nyquistResolutionNm: 40,
      },
      method: 'Lateral density of merged events',
      parameters: {},
    },
    diffraction: {
      value: 224.8,
      method: "Abbe's limit λ/(2 NA)",
      parameters: { emissionNm: 670, numericalAperture: 1.49 },
    },
  },
}

export const runningReport: QualityReportDto = {
  ...doneReport,
  status: 'running',
  progress: 0.42,
  message: 'frc',
  computedAt: null,
  metrics: {},
}

export const queuedReport: QualityReportDto = {
  ...runningReport,
  status: 'queued',
  progress: 0,
  message: null,
}

export const failedReport: QualityReportDto = {
  ...runningReport,
  status: 'failed',
  error: 'The localization store could not be read.',
}

/** The pyramid the server makes of x 1000…6000 nm, y 2000…4000 nm (256-px tiles, 1 nm finest). */
export const previewInfo: PreviewInfo = {
  tileSize: 256,
  levels: 6,
  originNm: { x: 1000, y: 2000 },
  extentNm: 8192,
  resolutionsNm: [32, 16, 8, 4, 2, 1],
  boundsNm: { xMin: 1000, xMax: 6000, yMin: 2000, yMax: 4000 },
  localizations: 1_250_000,
  frames: { first: 0, last: 19_999 },
  zRangeNm: null,
  channels: [0, 1],
  hasUncertainty: true,
}

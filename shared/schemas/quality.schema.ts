import { z } from 'zod'
import { VERDICT_TONES } from '../domain/quality-verdicts'

/**
 * `GET /api/datasets/:id/files/:fileId/quality`: the quality report of one localization table.
 * The headline numbers are flat (null when not computed); every metric also appears under
 * `metrics` with its method, its parameters and, when it could not be computed, the reason.
 */

export const qualityMetricSchema = z.object({
  /** The metric's result (numbers, curves, histograms); null when it could not be computed. */
  value: z.unknown(),
  method: z.string(),
  parameters: z.record(z.string(), z.unknown()),
  reason: z.string().optional(),
})
export type QualityMetric<T = unknown> = { value: T | null } & Omit<
  z.output<typeof qualityMetricSchema>,
  'value'
>

export const QUALITY_STATUSES = ['queued', 'running', 'done', 'failed'] as const
export type QualityStatus = (typeof QUALITY_STATUSES)[number]

export const driftTraceSchema = z.object({
  frame: z.array(z.number()),
  x: z.array(z.number()),
  y: z.array(z.number()),
})

export const qualityReportSchema = z
  .object({
    status: z.enum(QUALITY_STATUSES),
    /** 0…1 while the report is computed. */
    progress: z.number(),
    message: z.string().nullable(),
    /** When the report was computed (ISO 8601), null before. */
    computedAt: z.string().nullable(),
    localizations: z.number().nullable(),
    frames: z.number().nullable(),
    photonsMedian: z.number().nullable(),
    precisionMedianNm: z.number().nullable(),
    expectedPrecisionNm: z.number().nullable(),
    nenaPrecisionNm: z.number().nullable(),
    frcResolutionNm: z.number().nullable(),
    frcResolutionUncorrectedNm: z.number().nullable(),
    /** FRC after drift correction, without the repeat correction: compare with frcResolutionUncorrectedNm. */
    frcDriftCorrectedNm: z.number().nullable(),
    localizationsPerEmitter: z.number().nullable(),
    nyquistResolutionNm: z.number().nullable(),
    diffractionLimitNm: z.number().nullable(),
    /** Largest drift from the first frame, nm. */
    driftNm: z.number().nullable(),
    /** The drift trajectory at segment centres, nm. */
    drift: driftTraceSchema.nullable(),
    mergedEmitters: z.number().nullable(),
    metrics: z.record(z.string(), qualityMetricSchema),
    /** Why the whole report failed, in words (status 'failed'). */
    error: z.string().nullable(),
  })
  .meta({ id: 'QualityReport' })
export type QualityReportDto = z.output<typeof qualityReportSchema>

/** The computed part of a report, as the job returns it and the database keeps it. */
export type QualityFindings = Omit<
  QualityReportDto,
  'status' | 'progress' | 'message' | 'computedAt' | 'error'
>

/** One aspect of a table's quality judged in words: the worst of its verdicts sets its tone. */
export const qualityVerdictChipSchema = z.object({
  /** The card it sums up: precision, nena, frc, drift. */
  key: z.string(),
  title: z.string(),
  tone: z.enum(VERDICT_TONES),
  /** The verdicts' sentences, for a tooltip or a screen reader. */
  text: z.string(),
})
export type QualityVerdictChip = z.output<typeof qualityVerdictChipSchema>

/**
 * `GET /api/datasets/:id/quality`: one row per localization table of the dataset, with the
 * state of its report and the few numbers a reader compares tables by.
 */
export const datasetQualityItemSchema = z
  .object({
    fileId: z.number().int(),
    fileName: z.string(),
    status: z.enum(QUALITY_STATUSES),
    progress: z.number(),
    /** What the work waits for or does, in words; why it failed (status 'failed'). */
    message: z.string().nullable(),
    computedAt: z.string().nullable(),
    localizations: z.number().nullable(),
    precisionMedianNm: z.number().nullable(),
    frcResolutionNm: z.number().nullable(),
    driftNm: z.number().nullable(),
    verdicts: z.array(qualityVerdictChipSchema),
  })
  .meta({ id: 'DatasetQualityItem' })
export type DatasetQualityItem = z.output<typeof datasetQualityItemSchema>

export const datasetQualitySchema = z
  .object({
    items: z.array(datasetQualityItemSchema),
    /** Median fitted PSF SD (nm) over the tables with a sigma column; null when none has one. */
    psfSigmaMedianNm: z.number().nullable(),
  })
  .meta({ id: 'DatasetQuality' })
export type DatasetQualityDto = z.output<typeof datasetQualitySchema>

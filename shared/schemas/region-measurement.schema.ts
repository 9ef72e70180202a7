import { z } from 'zod'

/**
 * Measurements of the localizations inside a region: `GET /api/regions/:id/measurements?kind=…`
 * with the parameters as query values (all have defaults). Results are cached per region, its
 * geometry and the parameters, so asking again is free. Distances in nm, areas in nm², densities
 * per µm².
 */

export const MEASUREMENT_KINDS = ['summary', 'dbscan', 'ripley', 'nn', 'profile'] as const
export type MeasurementKind = (typeof MEASUREMENT_KINDS)[number]

const num = z.coerce.number().refine(Number.isFinite, 'must be a finite number')
const int = z.coerce.number().int()

/** Radius around a Point region that the measurement takes in, nm. */
const pointRadius = num.pipe(z.number().positive().max(50_000)).default(250)

export const measurementQuerySchema = z
  .discriminatedUnion('kind', [
    z.strictObject({ kind: z.literal('summary'), pointRadius }),
    z.strictObject({
      kind: z.literal('dbscan'),
      pointRadius,
      /** Neighbourhood radius, nm; neighbours at distance ≤ eps. */
      eps: num.pipe(z.number().positive().max(1_000)).default(20),
      /** Neighbours a core point needs, the point itself counted. */
      minPts: int.pipe(z.number().min(1).max(1_000)).default(5),
    }),
    z.strictObject({
      kind: z.literal('ripley'),
      pointRadius,
      rMax: num.pipe(z.number().positive().max(10_000)).default(200),
      steps: int.pipe(z.number().min(1).max(200)).default(40),
      simulations: int.pipe(z.number().min(0).max(999)).default(99),
      seed: int
        .pipe(
          z
            .number()
            .min(0)
            .max(2 ** 31),
        )
        .default(1),
      correction: z.enum(['translation', 'none']).default('translation'),
    }),
    z.strictObject({
      kind: z.literal('nn'),
      pointRadius,
      bins: int.pipe(z.number().min(5).max(500)).default(60),
    }),
    z.strictObject({
      kind: z.literal('profile'),
      pointRadius,
      /** Histogram bin along the line, nm. */
      binNm: num.pipe(z.number().min(0.5).max(1_000)).default(5),
      /** Band width, nm; the line region's own width when absent. */
      width: num.pipe(z.number().positive().max(100_000)).optional(),
    }),
  ])
  .meta({ id: 'MeasurementQuery' })
export type MeasurementQuery = z.output<typeof measurementQuerySchema>
export type MeasurementQueryInput = z.input<typeof measurementQuerySchema>

const xy = z.tuple([z.number(), z.number()])

const base = {
  /** Localizations inside the region. */
  count: z.number().int(),
  /** Area of the region, nm². */
  areaNm2: z.number(),
  /** Time the computation took (0 when the answer came from the cache), ms. */
  computeMs: z.number(),
  cached: z.boolean(),
}

export const summaryResultSchema = z.object({
  kind: z.literal('summary'),
  ...base,
  densityPerUm2: z.number(),
  /** Mean lateral precision of the localizations inside, nm (null without a precision column). */
  meanPrecisionNm: z.number().nullable(),
})

export const dbscanResultSchema = z.object({
  kind: z.literal('dbscan'),
  ...base,
  eps: z.number(),
  minPts: z.number(),
  /** How minPts and eps are read, for the reader of the result. */
  convention: z.string(),
  clusters: z.array(
    z.object({
      size: z.number().int(),
      /** Convex hull area, nm². */
      area: z.number(),
      centroid: xy,
      hull: z.array(xy),
    }),
  ),
  noise: z.number().int(),
})

export const ripleyResultSchema = z.object({
  kind: z.literal('ripley'),
  ...base,
  r: z.array(z.number()),
  K: z.array(z.number()),
  L: z.array(z.number()),
  H: z.array(z.number()),
  /** Lowest and highest L(r) over the simulations of complete spatial randomness. */
  envelope: z.object({ low: z.array(z.number()), high: z.array(z.number()) }).nullable(),
  simulations: z.number().int(),
  correction: z.enum(['translation', 'none']),
  pixelNm: z.number(),
})

export const nnResultSchema = z.object({
  kind: z.literal('nn'),
  ...base,
  meanNm: z.number().nullable(),
  medianNm: z.number().nullable(),
  /** Histogram: bin edges (bins + 1) and counts; distances above the last edge in the last bin. */
  edges: z.array(z.number()),
  counts: z.array(z.number()),
})

export const profileResultSchema = z.object({
  kind: z.literal('profile'),
  ...base,
  binNm: z.number(),
  lengthNm: z.number(),
  widthNm: z.number(),
  positions: z.array(z.number()),
  counts: z.array(z.number()),
  fitted: z.array(z.number()),
  peaks: z.array(
    z.object({ position: z.number(), sigma: z.number(), fwhm: z.number(), height: z.number() }),
  ),
  peakSeparation: z.number().nullable(),
  background: z.number(),
  fwhmInterpolated: z.number().nullable(),
})

export const measurementResultSchema = z
  .discriminatedUnion('kind', [
    summaryResultSchema,
    dbscanResultSchema,
    ripleyResultSchema,
    nnResultSchema,
    profileResultSchema,
  ])
  .meta({ id: 'MeasurementResult' })
export type MeasurementResult = z.infer<typeof measurementResultSchema>
export type SummaryResult = z.infer<typeof summaryResultSchema>
export type DbscanMeasurement = z.infer<typeof dbscanResultSchema>
export type RipleyMeasurement = z.infer<typeof ripleyResultSchema>
export type NnMeasurement = z.infer<typeof nnResultSchema>
export type ProfileMeasurement = z.infer<typeof profileResultSchema>

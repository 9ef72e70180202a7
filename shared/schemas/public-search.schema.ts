import { z } from 'zod'
import { pageQuerySchema } from './common.schema'

/** FRC resolution ranges a public search narrows by (released datasets' best table, nm). */
export const FRC_RANGES = [
  { key: 'under-20', label: 'under 20 nm', min: 0, max: 20 },
  { key: '20-40', label: '20–40 nm', min: 20, max: 40 },
  { key: '40-80', label: '40–80 nm', min: 40, max: 80 },
  { key: '80-plus', label: '80 nm and more', min: 80, max: Infinity },
] as const
export type FrcRangeKey = (typeof FRC_RANGES)[number]['key']

export const FRC_RANGE_KEYS = FRC_RANGES.map((r) => r.key) as [FrcRangeKey, ...FrcRangeKey[]]

/** The facets of the public search, in the order the page shows them, with their labels. */
export const SEARCH_FACETS = {
  technique: 'Technique',
  structure: 'Structure imaged',
  organism: 'Organism',
  probeClass: 'Probe class',
  frcRange: 'FRC resolution',
  year: 'Year',
} as const
export type SearchFacet = keyof typeof SEARCH_FACETS

export const PUBLIC_SEARCH_SORTS = ['relevance', 'newest', 'oldest', 'title', 'accession'] as const
export type PublicSearchSort = (typeof PUBLIC_SEARCH_SORTS)[number]

const facetValue = z.string().trim().min(1).max(200).optional()

export const publicSearchQuerySchema = pageQuerySchema
  .extend({
    limit: z.coerce.number().int().min(1).max(100).default(25),
    offset: z.coerce.number().int().min(0).max(10_000).default(0),
    q: z.string().trim().max(200, 'A search can have at most 200 characters').optional(),
    sort: z.enum(PUBLIC_SEARCH_SORTS).optional(),
    technique: facetValue,
    structure: facetValue,
    organism: facetValue,
    probeClass: facetValue,
    frcRange: z.enum(FRC_RANGE_KEYS).optional(),
    year: z.coerce.number().int().min(1900).max(3000).optional(),
  })
  .meta({ id: 'PublicSearchQuery' })
export type PublicSearchQuery = z.input<typeof publicSearchQuerySchema>
export type PublicSearchParams = z.output<typeof publicSearchQuerySchema>

export const publicSearchItemSchema = z
  .object({
    accession: z.string(),
    title: z.string(),
    summary: z.string(),
    authors: z.array(z.string()),
    technique: z.string().nullable(),
    structure: z.string().nullable(),
    organism: z.string().nullable(),
    probeClasses: z.array(z.string()),
    /** The year the data became (or becomes) public. */
    year: z.number().int().nullable(),
    /** Best FRC resolution of its tables; null under embargo or when none was computed. */
    frcResolutionNm: z.number().nullable(),
    embargoUntil: z.string().nullable(),
  })
  .meta({ id: 'PublicSearchItem' })
export type PublicSearchItem = z.infer<typeof publicSearchItemSchema>

export const facetCountSchema = z.object({ value: z.string(), count: z.number().int() })
export type FacetCount = z.infer<typeof facetCountSchema>

export const publicSearchPageSchema = z
  .object({
    items: z.array(publicSearchItemSchema),
    total: z.number().int(),
    /** Per facet: each value's count among the results of every other chosen facet. */
    facets: z.record(
      z.enum(Object.keys(SEARCH_FACETS) as [SearchFacet]),
      z.array(facetCountSchema),
    ),
  })
  .meta({ id: 'PublicSearchPage' })
export type PublicSearchPage = z.infer<typeof publicSearchPageSchema>

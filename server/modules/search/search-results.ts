import {
  FRC_RANGES,
  SEARCH_FACETS,
  type FacetCount,
  type PublicSearchItem,
  type PublicSearchParams,
  type PublicSearchSort,
  type SearchFacet,
} from '@shared/schemas/public-search.schema'

/** One searchable dataset as the public may see it, with the values its facets read. */
export interface SearchRow {
  item: PublicSearchItem
  /** Newest first sorts on this: when the data became (or becomes) public, ms. */
  availableAt: number
  /** bm25 of the search (lower is better); 0 without one. */
  rank: number
}

const frcRangeOf = (nm: number | null) =>
  nm === null ? [] : FRC_RANGES.filter((r) => nm >= r.min && nm < r.max).map((r) => r.key)

/** The values a dataset has for a facet (several for probe classes). */
function valuesOf(row: SearchRow, facet: SearchFacet): string[] {
  const i = row.item
  switch (facet) {
    case 'technique':
      return i.technique ? [i.technique] : []
    case 'structure':
      return i.structure ? [i.structure] : []
    case 'organism':
      return i.organism ? [i.organism] : []
    case 'probeClass':
      return i.probeClasses
    case 'frcRange':
      return frcRangeOf(i.frcResolutionNm)
    case 'year':
      return i.year === null ? [] : [String(i.year)]
  }
}

const FACETS = Object.keys(SEARCH_FACETS) as SearchFacet[]

/** The facet values chosen in a query (structure and organism compare without case). */
function chosen(q: PublicSearchParams): Partial<Record<SearchFacet, string>> {
  const out: Partial<Record<SearchFacet, string>> = {}
  for (const facet of FACETS) {
    const value = q[facet]
    if (value !== undefined) out[facet] = String(value)
  }
  return out
}

const same = (a: string, b: string) => a.localeCompare(b, 'en', { sensitivity: 'accent' }) === 0

function keeps(row: SearchRow, picks: Partial<Record<SearchFacet, string>>, except?: SearchFacet) {
  for (const facet of FACETS) {
    const want = picks[facet]
    if (facet === except || want === undefined) continue
    if (!valuesOf(row, facet).some((v) => same(v, want))) return false
  }
  return true
}

/** Facet values in a stable order: FRC ranges and years in their own order, others by count. */
function ordered(facet: SearchFacet, counts: Map<string, number>): FacetCount[] {
  const list = [...counts].map(([value, count]) => ({ value, count }))
  if (facet === 'frcRange') {
    const order: string[] = FRC_RANGES.map((r) => r.key)
    return list.sort((a, b) => order.indexOf(a.value) - order.indexOf(b.value))
  }
  if (facet === 'year') return list.sort((a, b) => Number(b.value) - Number(a.value))
  return list.sort((a, b) => b.count - a.count || a.value.localeCompare(b.value)).slice(0, 30)
}

const COMPARE: Record<PublicSearchSort, (a: SearchRow, b: SearchRow) => number> = {
  relevance: (a, b) => a.rank - b.rank || b.availableAt - a.availableAt,
  newest: (a, b) => b.availableAt - a.availableAt,
  oldest: (a, b) => a.availableAt - b.availableAt,
  title: (a, b) => a.item.title.localeCompare(b.item.title, 'en'),
  accession: (a, b) => a.item.accession.localeCompare(b.item.accession),
}

/**
 * A page of the public search from the rows that match its words: kept by every chosen facet,
 * sorted (relevance only with words), and each facet counted over the rows that every *other*
 * chosen facet keeps, so a chosen technique still shows what the other techniques would give.
 */
export function searchPage(rows: SearchRow[], q: PublicSearchParams) {
  const picks = chosen(q)
  const facets = {} as Record<SearchFacet, FacetCount[]>
  for (const facet of FACETS) {
    const counts = new Map<string, number>()
    for (const row of rows) {
      if (!keeps(row, picks, facet)) continue
      for (const value of new Set(valuesOf(row, facet)))
        counts.set(value, (counts.get(value) ?? 0) + 1)
    }
    facets[facet] = ordered(facet, counts)
  }
  const sort = q.sort ?? (q.q ? 'relevance' : 'newest')
  const kept = rows
    .filter((row) => keeps(row, picks))
    .sort((a, b) => COMPARE[sort](a, b) || a.item.accession.localeCompare(b.item.accession))
  return {
    items: kept.slice(q.offset, q.offset + q.limit).map((r) => r.item),
    total: kept.length,
    facets,
  }
}

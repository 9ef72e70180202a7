/**
 * What someone types in the dataset search box, turned into an FTS5 query for `dataset_fts`
 * (see its migration): every word must appear, the last piece of each word as a prefix, so
 * "PSD-95 hipp" finds "PSD-95 in hippocampal neurons" as the old substring search did for whole
 * words, and "STPL-0001" finds the accessions that begin so.
 */

/** English words too common to narrow a search; a query of nothing else finds nothing. */
const STOP_WORDS = new Set(
  'a an and are as at be by for from has have in into is it its of on or that the their this to was were with'.split(
    ' ',
  ),
)
/** More words than this add little but cost one index lookup each. */
const MAX_WORDS = 8
/** A one-letter prefix would expand to a large share of all words. */
const MIN_PREFIX = 2

/** The words worth looking for, each as its pieces of letters and digits; null when none. */
function searchWords(text: string): string[][] | null {
  const words: string[][] = []
  for (const word of text.normalize('NFKC').toLowerCase().split(/\s+/)) {
    const pieces = word.match(/[\p{L}\p{N}]+/gu)
    if (!pieces || (pieces.length === 1 && STOP_WORDS.has(pieces[0]!))) continue
    words.push(pieces)
    if (words.length === MAX_WORDS) break
  }
  return words.length ? words : null
}

const isPrefix = (pieces: string[]) => pieces[pieces.length - 1]!.length >= MIN_PREFIX

/**
 * The FTS5 MATCH expression for a search, or null when the text holds no word worth looking for
 * (only punctuation or stop words): the list then answers with an empty page, not a full scan.
 * Pieces are letters and digits only, as the index's tokenizer splits them, and are quoted, so
 * nothing typed can be read as FTS5 syntax.
 */
export function searchExpression(text: string): string | null {
  const words = searchWords(text)
  return words
    ? words.map((pieces) => `"${pieces.join(' ')}"${isPrefix(pieces) ? '*' : ''}`).join(' AND ')
    : null
}

/**
 * The same search as PostgreSQL's tsquery text (for `to_tsquery('simple', unaccent(?))` over
 * `dataset_search`): each word's pieces one after another (<->), the last as a prefix (:*),
 * every word required (&). Pieces are letters and digits only, so none is tsquery syntax.
 */
export function searchTsQuery(text: string): string | null {
  const words = searchWords(text)
  return words
    ? words.map((pieces) => `${pieces.join(' <-> ')}${isPrefix(pieces) ? ':*' : ''}`).join(' & ')
    : null
}

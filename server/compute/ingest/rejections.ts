/** Why a row of a localization table was not accepted, counted per reason with a few examples. */

export const REJECT_REASONS = [
  'field_count',
  'not_a_number',
  'nan',
  'infinite',
  'empty_required',
  'negative_frame',
  'non_integer',
  'out_of_range',
  'bad_quotes',
] as const
export type RejectReason = (typeof REJECT_REASONS)[number]

export const REJECT_DESCRIPTIONS: Record<RejectReason, string> = {
  field_count: 'wrong number of fields',
  not_a_number: 'text in a numeric column',
  nan: 'NaN or a missing-value marker (NA, null) in a required column',
  infinite: '±Infinity, or a number beyond the range of a double',
  empty_required: 'empty value in a required column (frame, x, y, z, channel)',
  negative_frame: 'frame number below the frame base (a negative 0-based frame)',
  non_integer: 'fractional value in an integer column (frame, channel)',
  out_of_range: 'value outside the column’s range (frame ≥ 2³², channel not in 0–65535)',
  bad_quotes: 'malformed quoting (text after a closing quote, or a quote never closed)',
}

/** `line` is the 1-based line in the source file where the record starts. */
export interface RejectExample {
  line: number
  column?: string
  text: string
}
export interface RejectTally {
  count: number
  examples: RejectExample[]
}
export type RejectionTallies = Partial<Record<RejectReason, RejectTally>>

export const MAX_EXAMPLES = 5
const MAX_EXAMPLE_CHARS = 80

export function truncateExample(text: string): string {
  return text.length > MAX_EXAMPLE_CHARS ? `${text.slice(0, MAX_EXAMPLE_CHARS - 1)}…` : text
}

export function addRejection(
  tallies: RejectionTallies,
  reason: RejectReason,
  example: RejectExample,
) {
  const tally = (tallies[reason] ??= { count: 0, examples: [] })
  tally.count++
  if (tally.examples.length < MAX_EXAMPLES) tally.examples.push(example)
}

/** Adds a later chunk's tallies; its example lines are relative, so `lineOffset` places them. */
export function mergeRejections(
  into: RejectionTallies,
  from: RejectionTallies,
  lineOffset: number,
) {
  for (const reason of REJECT_REASONS) {
    const tally = from[reason]
    if (!tally) continue
    const target = (into[reason] ??= { count: 0, examples: [] })
    target.count += tally.count
    for (const example of tally.examples) {
      if (target.examples.length >= MAX_EXAMPLES) break
      target.examples.push({ ...example, line: example.line + lineOffset })
    }
  }
}

export function countRejections(tallies: RejectionTallies): number {
  return REJECT_REASONS.reduce((sum, reason) => sum + (tallies[reason]?.count ?? 0), 0)
}

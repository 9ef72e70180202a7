/**
 * What a number field's text stands for: nothing when blank, a number once it reads as one (a
 * decimal comma is accepted), and the text itself otherwise, for the schema to reject in words.
 */
export function parseNumberInput(input: string): number | string | undefined {
  const trimmed = input.trim()
  if (trimmed === '') return undefined
  const n = Number(trimmed.replace(',', '.'))
  return Number.isFinite(n) ? n : input
}

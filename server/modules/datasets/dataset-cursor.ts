import { ValidationError } from '../../errors/http-error'

/** Where a page ended in its sort: the sorted column's value and the id, which breaks ties. */
export interface ListPosition {
  value: number | string
  id: number
}

/**
 * Cursors are opaque to clients (base64url of the sort and the last row's position), so the
 * keyset behind them can change without breaking anyone who only passes them back.
 */
export function encodeCursor(sort: string, at: ListPosition): string {
  return Buffer.from(JSON.stringify([sort, at.value, at.id])).toString('base64url')
}

const invalid = (detail: string) => new ValidationError([{ pointer: '#/cursor', detail }], detail)

/** The position a cursor names; a 400 when it is not one this list gave out for this sort. */
export function decodeCursor(
  cursor: string,
  sort: string,
  valueType: 'number' | 'string',
): ListPosition {
  let parsed: unknown
  try {
    parsed = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'))
  } catch {
    parsed = null
  }
  if (
    !Array.isArray(parsed) ||
    parsed.length !== 3 ||
    typeof parsed[0] !== 'string' ||
    !['number', 'string'].includes(typeof parsed[1]) ||
    !Number.isSafeInteger(parsed[2])
  ) {
    throw invalid('Not a cursor this list gave out; start again from the first page.')
  }
  if (parsed[0] !== sort) {
    throw invalid(`This cursor continues the sort "${parsed[0]}"; ask with that sort.`)
  }
  if (typeof parsed[1] !== valueType) {
    throw invalid('Not a cursor this list gave out; start again from the first page.')
  }
  return { value: parsed[1] as number | string, id: parsed[2] as number }
}

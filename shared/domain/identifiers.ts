import { z } from 'zod'

/** The outcome of reading an identifier a person typed or pasted. */
export type IdentifierResult =
  { ok: true; value: string } | { ok: false; reason: 'format' | 'checksum'; message: string }

export const ORCID_FORMAT_MESSAGE =
  'Enter an ORCID iD as 0000-0000-0000-0000 (the last character may be X) or https://orcid.org/…'
export const ORCID_CHECKSUM_MESSAGE =
  'This ORCID iD fails its check character: one of its digits is probably mistyped'

const ORCID_URL_PREFIX = /^(?:https?:\/\/)?(?:www\.)?orcid\.org\//i
const ORCID_PATTERN = /^(\d{4})-(\d{4})-(\d{4})-(\d{3})([\dX])$/

/**
 * The check character of an ORCID iD from its first 15 digits (hyphens allowed), by ISO/IEC 7064
 * MOD 11-2: t = (t + d)·2 over the digits, then (12 − t mod 11) mod 11, with 10 written as X.
 */
export function orcidCheckDigit(first15: string): string {
  const digits = first15.replaceAll('-', '')
  if (!/^\d{15}$/.test(digits)) {
    throw new RangeError(`An ORCID check needs 15 digits, got "${first15}"`)
  }
  let total = 0
  for (const digit of digits) total = (total + Number(digit)) * 2
  const check = (12 - (total % 11)) % 11
  return check === 10 ? 'X' : String(check)
}

/** Reads a bare or https://orcid.org/ iD into the bare hyphenated form, or says what is wrong. */
export function parseOrcid(input: string): IdentifierResult {
  const bare = input.trim().replace(ORCID_URL_PREFIX, '').toUpperCase()
  const match = ORCID_PATTERN.exec(bare)
  if (!match) return { ok: false, reason: 'format', message: ORCID_FORMAT_MESSAGE }
  if (orcidCheckDigit(bare.slice(0, -1)) !== match[5]) {
    return { ok: false, reason: 'checksum', message: ORCID_CHECKSUM_MESSAGE }
  }
  return { ok: true, value: bare }
}

export const orcidUrl = (orcid: string): string => `https://orcid.org/${orcid}`

export const DOI_FORMAT_MESSAGE =
  'Enter a DOI as 10.<registrant>/<suffix>, doi:10.… or https://doi.org/10.…'

const DOI_RESOLVER_PREFIX = /^https?:\/\/(?:dx\.)?doi\.org\//i
const DOI_SCHEME_PREFIX = /^doi:\s*/i
/**
 * DOI Handbook syntax: "10." and a registrant code of digits, optionally subdivided by full stops,
 * then "/" and a suffix of printable Unicode characters (no spaces or control characters).
 */
const DOI_PATTERN = /^10\.\d+(?:\.\d+)*\/[^\s\p{C}]+$/u

function stripDoiPrefix(text: string): string | null {
  if (!DOI_RESOLVER_PREFIX.test(text)) return text.replace(DOI_SCHEME_PREFIX, '')
  // A resolver link carries the DOI percent-encoded, as any URL path does.
  try {
    return decodeURIComponent(text.replace(DOI_RESOLVER_PREFIX, ''))
  } catch {
    return null
  }
}

/** Reads a DOI in any of its usual written forms into the bare `10.…/…` name. */
export function parseDoi(input: string): IdentifierResult {
  const bare = stripDoiPrefix(input.trim())
  if (bare === null || !DOI_PATTERN.test(bare)) {
    return { ok: false, reason: 'format', message: DOI_FORMAT_MESSAGE }
  }
  return { ok: true, value: bare }
}

/** DOI names are case-insensitive (DOI Handbook 2.2), so two spellings may name one object. */
export const sameDoi = (a: string, b: string): boolean => a.toUpperCase() === b.toUpperCase()

function identifierSchema(parse: (input: string) => IdentifierResult, requiredMessage: string) {
  return z.string({ error: requiredMessage }).transform((input, ctx) => {
    const result = parse(input)
    if (result.ok) return result.value
    ctx.addIssue({ code: 'custom', message: result.message, params: { reason: result.reason } })
    return z.NEVER
  })
}

/** A person's ORCID iD, normalised to 0000-0000-0000-000X. */
export const orcidSchema = identifierSchema(parseOrcid, 'An ORCID iD is required')

/** A DOI, normalised to the bare 10.… name with its case kept. */
export const doiSchema = identifierSchema(parseDoi, 'A DOI is required')

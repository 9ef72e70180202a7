/**
 * An embargo ends at 00:00 UTC of its day. People read that instant in their own zone, which can
 * be the day before (west of UTC) or later that day (east of UTC); both are stated.
 */
export function embargoEndWords(
  day: string,
  timeZone: string = Intl.DateTimeFormat().resolvedOptions().timeZone,
  locale?: string,
): { utc: string; local: string; zone: string } | null {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(day)) return null
  const end = new Date(`${day}T00:00:00Z`)
  if (Number.isNaN(end.getTime())) return null
  const style = { dateStyle: 'medium', timeStyle: 'short' } as const
  return {
    utc: new Intl.DateTimeFormat(locale, { ...style, timeZone: 'UTC' }).format(end),
    local: new Intl.DateTimeFormat(locale, { ...style, timeZone }).format(end),
    zone: timeZone,
  }
}

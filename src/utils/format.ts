const DAY = /^\d{4}-\d{2}-\d{2}$/
const dateFmt = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium' })
// Calendar days are UTC midnights: shown in UTC they read as the same day everywhere.
const dayFmt = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeZone: 'UTC' })
const dateTimeFmt = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' })

/** A calendar day (`YYYY-MM-DD`) or an ISO timestamp, shown as a date. */
export function formatDate(value: string | null | undefined, fallback = '—'): string {
  if (!value) return fallback
  const isDay = DAY.test(value)
  const date = new Date(isDay ? `${value}T00:00:00Z` : value)
  if (Number.isNaN(date.getTime())) return value
  return (isDay ? dayFmt : dateFmt).format(date)
}

export function formatDateTime(value: string | null | undefined, fallback = '—'): string {
  if (!value) return fallback
  const date = new Date(value)
  return Number.isNaN(date.getTime()) ? value : dateTimeFmt.format(date)
}

/** Today as `YYYY-MM-DD` (UTC), the form the API takes for embargo dates. */
export const todayIso = (): string => new Date().toISOString().slice(0, 10)

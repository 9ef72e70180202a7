import { SHIPPED_SUGGESTIONS } from '@shared/metadata/suggested-terms'

/**
 * The suggestions a field offers: what the project has used before first, then the vocabulary
 * shipped with the app, each value once (compared without regard to case).
 */
export function withShippedSuggestions(
  project: Record<string, string[]>,
): Record<string, string[]> {
  const merged: Record<string, string[]> = { ...project }
  for (const [key, shipped] of Object.entries(SHIPPED_SUGGESTIONS)) {
    const seen = new Set<string>()
    merged[key] = [...(project[key] ?? []), ...shipped].filter((value) => {
      const k = value.trim().toLowerCase()
      if (seen.has(k)) return false
      seen.add(k)
      return true
    })
  }
  return merged
}

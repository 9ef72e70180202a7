import { ref } from 'vue'
import type { CurationChecklist, CurationCheckDto } from '@shared/schemas/curation.schema'
import { getCurationThread } from '@/api/curation'

/** The checks of a dataset as they stand, and the steward's ticks (only items that do not apply start ticked). */
export function useCurationChecks() {
  const checks = ref<CurationCheckDto[]>([])
  const ticks = ref<CurationChecklist>({})
  const embargoMaxYears = ref<number | null>(null)
  const loading = ref(false)

  async function load(datasetId: number) {
    loading.value = true
    try {
      const thread = await getCurationThread(datasetId)
      checks.value = thread.checks
      embargoMaxYears.value = thread.embargoMaxYears
      ticks.value = Object.fromEntries(
        thread.checks.map((c) => [c.key, c.outcome === 'not_applicable']),
      )
    } catch {
      // The checklist is a help; the decision can still be sent, and the server checks again.
      checks.value = []
    } finally {
      loading.value = false
    }
  }
  return { checks, ticks, embargoMaxYears, loading, load }
}

import { ref, shallowRef, toValue, type MaybeRefOrGetter } from 'vue'
import { errorMessage } from '@/api/client'
import { getMetadata, putMetadata, type OmeImportReport } from '@/api/metadata'
import { checkDraft } from '@/utils/metadataIssues'
import { cleanDocument, setAt, type Draft } from '@/utils/metadataPaths'
import { describePath, metadataVocabulary } from '@/utils/metadataVocabulary'

/**
 * The OME-XML embedded in a raw stack as a prefill of the description: reviewed in the same
 * dialog as an imported document, then written path by path into the description as it is on
 * the server now (what the describe page does with an import), and saved.
 */
export function useStackPrefill(datasetId: MaybeRefOrGetter<number | null>, onSaved: () => void) {
  const open = ref(false)
  const report = shallowRef<OmeImportReport | null>(null)
  const current = shallowRef<Draft>({})
  const notice = ref<{ type: 'success' | 'error'; text: string } | null>(null)

  const need = () => {
    const id = toValue(datasetId)
    if (id === null) throw new Error('No dataset is open')
    return id
  }

  async function review(prefill: OmeImportReport) {
    notice.value = null
    try {
      current.value = cleanDocument((await getMetadata(need())).metadata)
      report.value = prefill
      open.value = true
    } catch (e) {
      notice.value = { type: 'error', text: errorMessage(e) }
    }
  }

  async function apply(values: { path: string; value: unknown }[]) {
    try {
      // Read again: someone may have typed in the describe page since the review opened.
      const document: Draft = structuredClone((await getMetadata(need())).metadata)
      for (const { path, value } of values) setAt(document, path, value)
      const check = checkDraft(cleanDocument(document))
      if (!check.ok) throw new Error(refusal(check.errors))
      await putMetadata(need(), check.metadata)
      const n = values.length
      notice.value = {
        type: 'success',
        text: `${n} ${n === 1 ? 'field' : 'fields'} of the description filled from the stack.`,
      }
      onSaved()
    } catch (e) {
      notice.value = { type: 'error', text: errorMessage(e) }
    }
  }

  return { open, report, current, notice, review, apply }
}

function refusal(errors: Record<string, string>): string {
  const [path, message] = Object.entries(errors)[0] ?? ['', 'not valid']
  const field = path ? describePath(metadataVocabulary(), path) : 'The description'
  return `Not saved: ${field}: ${message}`
}

export type StackPrefill = ReturnType<typeof useStackPrefill>

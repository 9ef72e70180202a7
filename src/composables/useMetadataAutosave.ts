import type { DatasetMetadata } from '@shared/metadata/metadata.schema'
import type { UpdateDatasetInput } from '@shared/schemas/dataset.schema'
import { ApiError, errorMessage } from '@/api/client'
import { putMetadata } from '@/api/metadata'
import type { CoreValues } from '@/utils/metadataIssues'
import { describePath, metadataVocabulary } from '@/utils/metadataVocabulary'
import { useAutosave } from './useAutosave'
import type { MetadataDraft } from './useMetadataDraft'

interface Snapshot {
  metadata: DatasetMetadata | null
  core: CoreValues
}

/** Why a draft cannot be saved yet, naming the field when only one is wrong. */
export function invalidReason(messages: Record<string, string>): string | null {
  const paths = Object.keys(messages)
  const [first] = paths
  if (first === undefined) return null
  if (paths.length > 1) return `${paths.length} fields need fixing`
  return `${describePath(metadataVocabulary(), first).split(' › ').at(-1)} needs fixing`
}

function refusedBy(error: unknown): string {
  if (error instanceof ApiError && error.status === 400) {
    const n = Object.keys(error.fieldErrors).length
    if (n) return `the server refused ${n === 1 ? 'one field' : `${n} fields`}`
  }
  return errorMessage(error)
}

/**
 * Autosave of a metadata draft: the document goes to PUT …/metadata, the dataset's title,
 * description and licence to PATCH /api/datasets/:id, each only when it changed. What the
 * server refuses is shown under its fields; the typed values are never replaced.
 */
export function useMetadataAutosave(
  draft: MetadataDraft,
  target: () => { id: number } | null,
  updateDataset: (body: UpdateDatasetInput) => Promise<unknown>,
) {
  let saved = { metadata: '', core: '' }

  /** Remember what the server holds now, so only later changes are sent. */
  function settled() {
    saved = {
      metadata: JSON.stringify(draft.check.value.ok ? draft.check.value.metadata : null),
      core: JSON.stringify(draft.core),
    }
  }

  async function save({ metadata, core }: Snapshot) {
    const dataset = target()
    if (!dataset || !metadata) return
    const json = { metadata: JSON.stringify(metadata), core: JSON.stringify(core) }
    const jobs: Promise<unknown>[] = []
    if (json.metadata !== saved.metadata) {
      jobs.push(putMetadata(dataset.id, metadata).then(() => (saved.metadata = json.metadata)))
    }
    if (json.core !== saved.core) {
      const { licence, ...text } = core
      const body = licence.trim() ? { ...text, licence } : text
      jobs.push(updateDataset(body).then(() => (saved.core = json.core)))
    }
    const failed = (await Promise.allSettled(jobs)).find((r) => r.status === 'rejected')
    if (!failed) return
    const reason: unknown = failed.reason
    if (reason instanceof ApiError) {
      draft.serverMessages.value = { ...draft.serverMessages.value, ...reason.fieldErrors }
    }
    throw reason
  }

  const autosave = useAutosave<Snapshot>({
    snapshot: () => ({
      metadata: draft.check.value.ok ? draft.check.value.metadata : null,
      core: { ...draft.core },
    }),
    blocker: () => invalidReason(draft.localMessages.value),
    save,
    describeError: refusedBy,
  })
  return { ...autosave, settled }
}

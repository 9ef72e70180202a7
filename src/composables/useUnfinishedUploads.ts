import { computed, ref, shallowRef, toValue, type MaybeRefOrGetter } from 'vue'
import type { UploadInProgress } from '@/api/files'
import {
  discardUpload,
  forgetStored,
  serverOffset,
  storedUploads,
  type ServerOffset,
} from '@/api/uploads'

/** An upload the server holds part of, waiting for its file to be chosen again. */
export interface UnfinishedUpload {
  uploadId: string
  name: string
  size: number | null
  /** Bytes the server holds; null until asked. */
  offset: number | null
}

interface Candidate {
  uploadId: string
  name: string
  size: number | null
}

/** Server entries first; the browser's own notes add uploads the server list may not name. */
function merge(server: UploadInProgress[], stored: Candidate[]): Candidate[] {
  const byId = new Map<string, Candidate>()
  for (const s of server) byId.set(s.uploadId, { uploadId: s.uploadId, name: s.name, size: s.size })
  for (const s of stored) if (!byId.has(s.uploadId)) byId.set(s.uploadId, s)
  return [...byId.values()]
}

/**
 * Uploads left unfinished (a reload, a closed tab, a lost connection): a browser cannot reopen a
 * file by itself, so they wait until the depositor chooses the same file again, and then continue
 * from the server's offset.
 */
export function useUnfinishedUploads(
  dataset: MaybeRefOrGetter<string | null>,
  active: MaybeRefOrGetter<ReadonlySet<string>>,
) {
  const candidates = shallowRef<Candidate[]>([])
  const offsets = ref<Record<string, ServerOffset>>({})
  const error = ref<string | null>(null)

  async function refresh(server: UploadInProgress[]) {
    const accession = toValue(dataset)
    if (!accession) return
    const merged = merge(server, await storedUploads(accession))
    // Never ask about an upload running here: the server's HEAD takes the upload's lock, which
    // would cut the running PATCH short.
    const running = toValue(active)
    const unknown = merged.filter((c) => !(c.uploadId in offsets.value) && !running.has(c.uploadId))
    const answers = await Promise.all(unknown.map((c) => serverOffset(c.uploadId)))
    unknown.forEach((c, i) => (offsets.value[c.uploadId] = answers[i] ?? 'unknown'))
    // Notes of uploads the server no longer holds (expired, finished, refused) are dropped.
    for (const c of merged) if (offsets.value[c.uploadId] === 'gone') void forgetStored(c.uploadId)
    candidates.value = merged
  }

  const list = computed<UnfinishedUpload[]>(() => {
    const running = toValue(active)
    return candidates.value.flatMap((c) => {
      const offset = offsets.value[c.uploadId]
      if (offset === 'gone' || running.has(c.uploadId)) return []
      return [{ ...c, offset: typeof offset === 'number' ? offset : null }]
    })
  })

  /** The unfinished upload a chosen file continues: same name and size. */
  function matchFor(file: File): string | undefined {
    return list.value.find((u) => u.name === file.name && (u.size ?? file.size) === file.size)
      ?.uploadId
  }

  async function discard(uploadId: string) {
    error.value = null
    try {
      await discardUpload(uploadId)
      offsets.value[uploadId] = 'gone'
    } catch {
      error.value = 'The unfinished upload could not be deleted. Try again.'
    }
  }

  /** An upload that finished here: the server holds no unfinished part of it any more. */
  function finished(uploadId: string) {
    offsets.value[uploadId] = 'gone'
  }

  return { list, error, refresh, matchFor, discard, finished }
}

export type UnfinishedUploads = ReturnType<typeof useUnfinishedUploads>

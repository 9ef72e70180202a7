import {
  computed,
  onMounted,
  onBeforeUnmount,
  onScopeDispose,
  toValue,
  watch,
  type MaybeRefOrGetter,
} from 'vue'
import { fileUrls } from '@/api/files'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import { useDatasetFiles } from './useDatasetFiles'
import { useUnfinishedUploads, type UnfinishedUploads } from './useUnfinishedUploads'
import { useUploadQueue } from './useUploadQueue'

export interface FilesRights {
  edit: boolean
  download: boolean
  preview: boolean
}

/**
 * The Files tab of a dataset: its file list (polled while files are processed), the browser's
 * uploads to it, and the unfinished uploads waiting for their files to be chosen again.
 */
export function useFilesTab(
  dataset: MaybeRefOrGetter<DatasetDto | null>,
  active: MaybeRefOrGetter<boolean>,
  rights: MaybeRefOrGetter<FilesRights>,
) {
  const id = () => toValue(dataset)?.id ?? null
  const accession = () => (toValue(rights).edit ? (toValue(dataset)?.accession ?? null) : null)
  const files = useDatasetFiles(id, active)

  let unfinished: UnfinishedUploads | null = null
  const queue = useUploadQueue({
    dataset: accession,
    resumeIdFor: (file) => unfinished?.matchFor(file),
    // The file joins the list below; its upload row has said all it had to.
    onFinished: (item) => {
      if (item.uploadId) unfinished?.finished(item.uploadId)
      void files.reload().then(() => queue.dismiss(item.key))
    },
  })
  unfinished = useUnfinishedUploads(accession, queue.activeIds)
  const waiting = unfinished
  watch(files.uploadsInProgress, (list) => void waiting.refresh(list))
  watch(
    () => toValue(dataset)?.accession,
    () => queue.pump(),
  )

  const uploading = computed(() => queue.items.some((i) => i.state === 'uploading'))
  // Closing the tab mid-upload asks first; what arrived stays on the server to continue later.
  const warn = (event: BeforeUnloadEvent) => {
    if (uploading.value) event.preventDefault()
  }
  onMounted(() => window.addEventListener('beforeunload', warn))
  onBeforeUnmount(() => window.removeEventListener('beforeunload', warn))
  onScopeDispose(() => queue.stopAll())

  const urls = computed(() => {
    const datasetId = id()
    const can = toValue(rights)
    if (datasetId === null) return null
    return {
      archive: can.download ? fileUrls.archive(datasetId) : null,
      manifest: can.download ? fileUrls.manifest(datasetId) : null,
      content: (fileId: number) => fileUrls.content(datasetId, fileId),
      thumbnail: (fileId: number) => (can.preview ? fileUrls.thumbnail(datasetId, fileId) : null),
    }
  })

  return { files, queue, unfinished: waiting, urls, uploading }
}

export type FilesTab = ReturnType<typeof useFilesTab>

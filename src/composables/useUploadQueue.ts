import { computed, reactive, type Reactive } from 'vue'
import { createTransfer, type Transfer, type TransferTarget } from '@/api/uploads'
import { TransferRate } from '@/utils/transferRate'
import { refusalOf } from '@/utils/uploadRefusal'

/**
 * queued → uploading → done; uploading ⇄ paused; interrupted uploads can be resumed;
 * refused and duplicate are final; any unfinished one can be cancelled.
 */
export type UploadState =
  | 'queued'
  | 'uploading'
  | 'paused'
  | 'interrupted'
  | 'cancelling'
  | 'cancelled'
  | 'done'
  | 'duplicate'
  | 'refused'

export interface UploadItem {
  key: number
  name: string
  size: number
  state: UploadState
  /** Bytes the server has acknowledged (tus progress). */
  sent: number
  bytesPerSecond: number | null
  secondsLeft: number | null
  /** Bytes the server already held when this transfer (re)started from a stored upload. */
  resumedFrom: number | null
  uploadId: string | null
  fileId: number | null
  message: string | null
}

const newItem = (key: number, file: File): UploadItem => ({
  ...{ key, name: file.name, size: file.size, state: 'queued', sent: 0 },
  ...{ bytesPerSecond: null, secondsLeft: null, resumedFrom: null },
  ...{ uploadId: null, fileId: null, message: null },
})

const FINAL: readonly UploadState[] = ['cancelled', 'done', 'duplicate', 'refused']
export const isFinal = (state: UploadState) => FINAL.includes(state)
// Read through a call: the state may change while an await is pending.
const stateOf = (item: UploadItem) => item.state

export interface UploadQueueOptions {
  /** The dataset's accession; uploads wait until it is known. */
  dataset: () => string | null
  /** How many files travel at once; the rest wait their turn. */
  parallel?: number
  /** The id of an unfinished server upload of the same file, to continue it. */
  resumeIdFor?: (file: File) => string | undefined
  /** A file arrived and is registered (refresh the list). */
  onFinished?: (item: UploadItem) => void
  now?: () => number
  transfer?: typeof createTransfer
}

interface Slot {
  file: File
  transfer: Transfer | null
  rate: TransferRate
}

/** Browser uploads of several files: a few at a time, each with pause, resume and cancel. */
export function useUploadQueue(options: UploadQueueOptions) {
  const parallel = options.parallel ?? 2
  const now = options.now ?? (() => performance.now())
  const makeTransfer = options.transfer ?? createTransfer
  const items = reactive<UploadItem[]>([])
  const slots = new Map<number, Slot>()
  let nextKey = 1

  const find = (key: number) => items.find((i) => i.key === key)
  const activeIds = computed(
    () => new Set(items.filter((i) => !isFinal(i.state) && i.uploadId).map((i) => i.uploadId!)),
  )

  function add(files: Iterable<File>) {
    for (const file of files) {
      const key = nextKey++
      slots.set(key, { file, transfer: null, rate: new TransferRate() })
      items.push(newItem(key, file))
    }
    pump()
  }

  function pump() {
    const dataset = options.dataset()
    if (!dataset) return
    let running = items.filter((i) => i.state === 'uploading').length
    for (const item of items) {
      if (running >= parallel) break
      if (item.state !== 'queued') continue
      running++
      begin(item, dataset)
    }
  }

  function begin(item: Reactive<UploadItem>, dataset: string) {
    const slot = slots.get(item.key)
    if (!slot) return
    item.state = 'uploading'
    item.message = null
    slot.rate.reset()
    slot.transfer ??= makeTransfer(slot.file, targetFor(slot.file, dataset), eventsFor(item, slot))
    void slot.transfer.start()
  }

  function targetFor(file: File, dataset: string): TransferTarget {
    const resumeUploadId = options.resumeIdFor?.(file)
    return resumeUploadId ? { dataset, resumeUploadId } : { dataset }
  }

  function eventsFor(item: Reactive<UploadItem>, slot: Slot) {
    const live = () => item.state === 'uploading'
    return {
      onProgress(sent: number, total: number) {
        if (!live()) return
        item.sent = sent
        slot.rate.add(sent, now())
        item.bytesPerSecond = slot.rate.bytesPerSecond()
        item.secondsLeft = slot.rate.secondsLeft(total)
      },
      onResumedAt(offset: number) {
        item.resumedFrom = offset
        item.sent = offset
        slot.rate.reset()
        slot.rate.add(offset, now())
      },
      onUploadId: (id: string) => (item.uploadId = id),
      onSuccess(fileId: number | null) {
        settle(item, 'done', null)
        item.sent = item.size
        item.fileId = fileId
        // tus-js-client removes the resume point only of uploads it found itself; one continued
        // from the unfinished list must be forgotten here.
        void slot.transfer?.forget()
        options.onFinished?.(item)
        pump()
      },
      onError: (error: unknown) => failed(item, slot, error),
    }
  }

  function failed(item: Reactive<UploadItem>, slot: Slot, error: unknown) {
    if (item.state !== 'uploading') return
    const refusal = refusalOf(error)
    settle(item, refusal.kind, refusal.message)
    if (refusal.kind === 'duplicate') item.fileId = refusal.existingFileId
    // A refused upload is deleted on the server; its stored resume point is of no use.
    if (refusal.kind !== 'interrupted') void slot.transfer?.forget()
    pump()
  }

  function settle(item: Reactive<UploadItem>, state: UploadState, message: string | null) {
    item.state = state
    item.message = message
    item.bytesPerSecond = null
    item.secondsLeft = null
  }

  async function pause(key: number) {
    const item = find(key)
    if (!item || (item.state !== 'uploading' && item.state !== 'queued')) return
    const wasRunning = item.state === 'uploading'
    settle(item, 'paused', null)
    if (wasRunning) await slots.get(key)?.transfer?.pause()
    pump()
  }

  function resume(key: number) {
    const item = find(key)
    if (!item || (item.state !== 'paused' && item.state !== 'interrupted')) return
    settle(item, 'queued', null)
    pump()
  }

  async function cancel(key: number) {
    const item = find(key)
    if (!item || isFinal(item.state) || item.state === 'cancelling') return
    const transfer = slots.get(key)?.transfer
    settle(item, 'cancelling', null)
    pump()
    try {
      await transfer?.cancel()
      // The last chunk may have landed meanwhile: a registered file stays done.
      if (stateOf(item) !== 'cancelling') return
      settle(item, 'cancelled', null)
      slots.delete(key)
    } catch {
      if (stateOf(item) !== 'cancelling') return
      settle(item, 'interrupted', 'Cancelling failed: the server could not be reached. Try again.')
    }
  }

  function dismiss(key: number) {
    const index = items.findIndex((i) => i.key === key)
    if (index < 0 || !isFinal(items[index]!.state)) return
    items.splice(index, 1)
    slots.delete(key)
  }

  /** Stops every transfer without deleting anything (leaving the page); they can be resumed. */
  function stopAll() {
    for (const item of items) if (item.state === 'uploading') void pause(item.key)
  }

  return { items, activeIds, add, pause, resume, cancel, dismiss, stopAll, pump }
}

export type UploadQueue = ReturnType<typeof useUploadQueue>

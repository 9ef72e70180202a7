import cluster from 'node:cluster'
import type { DatasetEventName } from '@shared/schemas/comment.schema'
import { isStippleMessage, type ToPrimary, type ToWorker } from '../../cluster/messages'

/**
 * Something that happened on a dataset, as every open event stream of it should hear. `data` is
 * the same for everyone; each stream presents it to its own reader (authors hidden or not, what
 * they may change) before writing it.
 */
export interface DatasetEvent<T = unknown> {
  datasetId: number
  name: DatasetEventName
  data: T
}

type Listener = (event: DatasetEvent) => void

/**
 * Publish/subscribe of dataset events inside one process, and across the HTTP workers of a
 * multi-process Stipple: a worker hands each event to the primary over the cluster's IPC
 * channel, and the primary sends it to every worker (the sender included), which delivers it
 * to its own streams. A single process delivers at once.
 */
export class DatasetEventHub {
  private readonly listeners = new Map<number, Set<Listener>>()
  private readonly inWorker = cluster.isWorker

  constructor() {
    if (this.inWorker)
      process.on('message', (message) => {
        if (isStippleMessage<ToWorker>(message) && message.stipple === 'dataset-event')
          this.deliver(message.event as DatasetEvent)
      })
  }

  /** Listens to one dataset's events; the returned function stops listening. */
  subscribe(datasetId: number, listener: Listener): () => void {
    let set = this.listeners.get(datasetId)
    if (!set) this.listeners.set(datasetId, (set = new Set()))
    set.add(listener)
    return () => {
      set.delete(listener)
      if (!set.size) this.listeners.delete(datasetId)
    }
  }

  publish(event: DatasetEvent): void {
    if (this.inWorker && process.connected) {
      const message: ToPrimary = { stipple: 'dataset-event', event }
      process.send?.(message)
    } else this.deliver(event)
  }

  /** Open streams across all datasets (for tests and health pages). */
  get streams(): number {
    let n = 0
    for (const set of this.listeners.values()) n += set.size
    return n
  }

  private deliver(event: DatasetEvent) {
    for (const listener of this.listeners.get(event.datasetId) ?? []) {
      listener(event)
    }
  }
}

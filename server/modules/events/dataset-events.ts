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
 * How events reach the other processes that serve HTTP: `send` hands an event to every process's
 * hub (this one's included, which then hears it through `onEvent` like the others).
 */
export interface DatasetEventRelay {
  send(event: DatasetEvent): void
  onEvent(listener: Listener): void
}

/**
 * The HTTP workers of a multi-process Stipple on one host: a worker hands each event to the
 * primary over the cluster's IPC channel, and the primary sends it to every worker.
 */
export function clusterEventRelay(): DatasetEventRelay {
  return {
    send(event) {
      if (!process.connected) return
      const message: ToPrimary = { stipple: 'dataset-event', event }
      process.send?.(message)
    },
    onEvent(listener) {
      process.on('message', (message) => {
        if (isStippleMessage<ToWorker>(message) && message.stipple === 'dataset-event')
          listener(message.event as DatasetEvent)
      })
    },
  }
}

/**
 * Publish/subscribe of dataset events for the open event streams of this process. With a relay
 * (several HTTP workers on one host, or app nodes on several machines sharing PostgreSQL) every
 * event goes through it, so streams on every process hear it; a single process delivers at once.
 */
export class DatasetEventHub {
  private readonly listeners = new Map<number, Set<Listener>>()
  private readonly relay: DatasetEventRelay | null

  constructor(relay: DatasetEventRelay | null = cluster.isWorker ? clusterEventRelay() : null) {
    this.relay = relay
    relay?.onEvent((event) => this.deliver(event))
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
    if (this.relay) this.relay.send(event)
    else this.deliver(event)
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

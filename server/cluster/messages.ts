import type { CaughtMail } from '../modules/mail/mail-catcher'

/**
 * What the HTTP workers and the primary of a multi-process Stipple (WEB_CONCURRENCY > 1) say to
 * each other over the cluster's IPC channel. Every message carries `stipple`, so the channel can
 * also carry the rate-limit store's own messages.
 */
export type ToPrimary =
  | { stipple: 'lock'; ticket: string; id: string }
  | { stipple: 'lock-abort'; ticket: string }
  | { stipple: 'unlock'; ticket: string }
  | { stipple: 'jobs-notify' }
  | { stipple: 'mail-list'; ask: number }
  | { stipple: 'listening'; url: string }
  | { stipple: 'dataset-event'; event: unknown }

export type ToWorker =
  | { stipple: 'locked'; ticket: string }
  | { stipple: 'lock-failed'; ticket: string }
  | { stipple: 'release-requested'; ticket: string }
  | { stipple: 'unlocked'; ticket: string }
  | { stipple: 'mail-list'; ask: number; items: CaughtMail[] }
  | { stipple: 'dataset-event'; event: unknown }

export function isStippleMessage<T extends { stipple: string }>(message: unknown): message is T {
  return typeof message === 'object' && message !== null && 'stipple' in message
}

/** One end of the channel: the worker's `process`, or the primary's handle of one worker. */
export interface Channel<Out, In> {
  send(message: Out): void
  onMessage(listener: (message: In) => void): void
}

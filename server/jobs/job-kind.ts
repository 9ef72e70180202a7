import type { z } from 'zod'

/** What a job is about. A job on a file goes when the file goes (its row cascades). */
export type JobSubjectType = 'file' | 'dataset' | 'region'
export interface JobSubject {
  type: JobSubjectType
  id: number
}

/**
 * A kind of heavy work, declared once by the module that owns it and used on both sides: the
 * main thread validates and queues payloads with it, the worker thread parses them with it.
 * Payloads hold storage keys and ids, never absolute paths, so storage can be swapped.
 */
export interface JobKind<S extends z.ZodType = z.ZodType> {
  name: string
  payload: S
  subject(payload: z.output<S>): JobSubject
  /**
   * Work of this kind with the same key is not done twice: queuing it again replaces a queued
   * one and cancels a running one (its result would be stale). Defaults to one per subject.
   */
  dedupeKey?(payload: z.output<S>): string
  /** Kinds on the same subject that must have finished before this one starts. */
  after?: readonly string[]
  /**
   * Run in a thread that ends with the job: whatever memory the work held (buffers, heaps of
   * its helper threads) goes back to the system rather than staying with an idle thread.
   */
  freshThread?: boolean
}

export const defineJobKind = <S extends z.ZodType>(kind: JobKind<S>): JobKind<S> => kind

export const dedupeKeyOf = <S extends z.ZodType>(kind: JobKind<S>, payload: z.output<S>) => {
  if (kind.dedupeKey) return kind.dedupeKey(payload)
  const subject = kind.subject(payload)
  return `${subject.type}:${subject.id}`
}

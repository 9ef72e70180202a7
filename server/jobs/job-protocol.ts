import type { LocalStorage } from '../storage/local-storage'

/** Messages between the job runner (main thread) and a job's worker thread. */
export interface JobRequest {
  kind: string
  payload: Record<string, unknown>
}

export type JobMessage =
  | { type: 'progress'; fraction: number; message?: string }
  | { type: 'done'; result: unknown }
  | { type: 'failed'; error: string }

export type ProgressReporter = (fraction: number, message?: string) => void

/** What a job's work gets besides its payload: where bytes live, and a way to report progress. */
export interface WorkContext {
  storage: LocalStorage
  progress: ProgressReporter
}

/**
 * Work done in a worker thread: files in, files and a JSON result out; never the database. The
 * payload arrives as stored; the work parses it with its kind's schema.
 */
export type JobWork = (payload: unknown, context: WorkContext) => Promise<unknown>

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

/** Work done in a worker thread: files in, files and a JSON result out; never the database. */
export type JobWork = (
  payload: Record<string, unknown>,
  progress: ProgressReporter,
) => Promise<unknown>

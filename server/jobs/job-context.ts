import { AsyncLocalStorage } from 'node:async_hooks'

/**
 * The job whose outcome is being recorded: work it queues (an ingest after an inspection, a
 * report after an ingest) takes its priority, so background work such as the demo tables stays
 * behind what people upload from start to finish.
 */
export const recordingJob = new AsyncLocalStorage<{ priority: number }>()

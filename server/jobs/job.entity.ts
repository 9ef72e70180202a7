import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { DatasetFile } from '../modules/files/dataset-file.entity'
import type { JobSubjectType } from './job-kind'

export const JOB_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const
export type JobState = (typeof JOB_STATES)[number]

/**
 * A unit of heavy work (ingest, raw-stack scan, quality report), persisted so that a restart
 * resumes it: jobs found running at start-up were cut off and go back to the queue. Its kind
 * (server/jobs/job-kind.ts) declares the payload, the subject, the dedupe key and what it waits for.
 */
export const Job = defineEntity({
  name: 'Job',
  indexes: [
    { properties: ['state', 'priority', 'id'] },
    { properties: ['subjectType', 'subjectId'] },
    { properties: ['kind', 'dedupeKey'] },
  ],
  properties: {
    id: p.integer().primary(),
    kind: p.string(),
    payload: p.json<Record<string, unknown>>(),
    // Defaults only for rows of older releases (see the migration); enqueue() always sets them.
    subjectType: p.string().$type<JobSubjectType>().default('file'),
    subjectId: p.integer().default(0),
    dedupeKey: p.string().default(''),
    /** `,kind,kind,`: kinds on the same subject that must finish first (matched with instr()). */
    afterKinds: p.string().default(''),
    state: p.string().$type<JobState>().default('queued'),
    /** Higher runs first; background work (demo tables) is queued below 0. */
    priority: p.integer().default(0),
    /** Set when newer work replaced this running job; the runner stops it. */
    cancelRequested: p.boolean().default(false),
    progress: p.float().default(0),
    message: p.string().nullable(),
    error: p.text().nullable(),
    attempts: p.integer().default(0),
    file: p.manyToOne(DatasetFile).mapToPk().nullable().deleteRule('cascade').index(),
    createdAt: p.datetime().onCreate(() => new Date()),
    startedAt: p.datetime().nullable(),
    /** Raised every few seconds while a process works on the job; a stale one means it died. */
    heartbeatAt: p.datetime().nullable(),
    finishedAt: p.datetime().nullable(),
  },
})
export type IJob = InferEntity<typeof Job>

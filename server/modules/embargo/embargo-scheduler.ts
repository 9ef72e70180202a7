import { Cron } from 'croner'
import type { Orm } from '../../db'
import type { Logger } from '../../logger'
import {
  runEmbargoSchedule,
  type EmbargoScheduleDeps,
  type EmbargoTickResult,
} from './embargo-schedule.service'

/** Time comes from outside, so tests can stand before, at and after an embargo's end. */
export type Clock = () => Date

export interface EmbargoScheduler {
  /** Catches up on everything missed while the server was down, then ticks every minute. */
  start(): Promise<EmbargoTickResult>
  /** One pass now (what each cron tick runs). */
  tick(): Promise<EmbargoTickResult>
  stop(): void
}

/**
 * The embargo schedule in the background process: a croner job in UTC, every minute. Embargoes
 * end at whole days, and access already follows the clock to the second (the abilities); the
 * ticks add the record (release notice, audit event) and the e-mails. Croner's `protect` skips a
 * tick while the previous one still runs; each tick is idempotent anyway.
 */
export function createEmbargoScheduler(
  deps: EmbargoScheduleDeps & {
    orm: Orm
    logger: Logger
    clock: Clock
    /**
     * App nodes on several machines: runs a tick on one node only, null on the others
     * (server/coordination). Without it every tick runs here.
     */
    oncePerTick?: (
      at: Date,
      work: () => Promise<EmbargoTickResult>,
    ) => Promise<EmbargoTickResult | null>
  },
): EmbargoScheduler {
  let job: Cron | null = null
  const tick = async () => {
    const now = deps.clock()
    const run = () => runEmbargoSchedule(deps.orm.em.fork(), deps, now)
    const result = deps.oncePerTick
      ? ((await deps.oncePerTick(now, run)) ?? { released: [], reminded: [] })
      : await run()
    if (result.released.length || result.reminded.length)
      deps.logger.info({ ...result }, 'embargo schedule: releases and reminders')
    return result
  }
  return {
    tick,
    async start() {
      const caughtUp = await tick()
      job = new Cron('* * * * *', { timezone: 'UTC', protect: true }, async () => {
        await tick().catch((err: unknown) => deps.logger.error({ err }, 'embargo schedule failed'))
      })
      return caughtUp
    },
    stop() {
      job?.stop()
      job = null
    },
  }
}

import type { Request } from 'express'
import type { AppConfig } from './config'
import type { Orm } from './db'
import type { Logger } from './logger'
import type { Mailer } from './modules/mail/mailer'
import type { PreviewService } from './modules/preview/preview.service'
import type { ReadConnection } from './modules/common/read-connection'
import type { LocalStorage } from './storage/local-storage'
import type { DatasetEventRelay } from './modules/events/dataset-events'

/** What services need from the outside, injected by createApp (tests pass their own). */
export interface AppDeps {
  orm: Orm
  config: AppConfig
  mailer: Mailer
  logger: Logger
  storage: LocalStorage
  /** Told when new jobs were queued, so they start at once rather than at the next poll. */
  jobs?: { notify(): void }
  /** Preview tiles of localization tables (createApp makes it). */
  previews?: PreviewService
  /** Prepared read-only statements for the hottest reads (createApp makes it). */
  reads?: ReadConnection
  /** How dataset events reach other processes (app nodes on PostgreSQL); see DatasetEventHub. */
  eventRelay?: DatasetEventRelay
  /** The time, injected so tests can move it; the wall clock when omitted. */
  clock?: () => Date
}

/** The injected clock, or the wall clock. */
export const clockOf = (deps: Pick<AppDeps, 'clock'>): (() => Date) =>
  deps.clock ?? (() => new Date())

/** The part of a request services may use: who acts, with which abilities, from where. */
export type Actor = Pick<Request, 'user' | 'viewer' | 'ability' | 'ip'> &
  Partial<Pick<Request, 'accessVersion'>>

import type { Worker } from 'node:worker_threads'
import type { QualityFindings } from '@shared/schemas/quality.schema'
import { startThread } from '../../threads'
import { estimateDrift } from '../drift'
import type { FrcResult } from '../frc'
import type { Localizations } from '../localizations.types'
import { mergeLocalizations } from '../merge'
import { estimateNenaPrecision } from '../nena'
import { assembleFindings, statisticsOf, stepTracker, type QualityInputs } from './compute-quality'
import type { FrcThreadReply, FrcThreadRequest } from './frc-thread.protocol'

const FRC_THREAD = new URL('./frc.thread.ts', import.meta.url)

/**
 * The same report as `computeQuality`, on two cores: a second thread computes the two FRCs (about
 * half of the work) while this one computes the statistics, the drift (first, because the second
 * FRC needs it), merging and NeNA. The second thread gets its own copy of the columns FRC reads (not
 * shared memory, which V8 reads ≈30 % slower); its allocation runs in parallel.
 */
export async function computeQualityOnTwoThreads(
  locs: Localizations,
  inputs: QualityInputs = {},
  onProgress: (fraction: number, step: string) => void = () => {},
): Promise<QualityFindings> {
  const steps = stepTracker(onProgress)
  const thread = startThread(FRC_THREAD)
  try {
    const replies = frcReplies(thread, steps)
    const { count, x, y, frame, uncertainty } = locs
    send(thread, { type: 'table', locs: { count, x, y, frame, uncertainty } })
    steps.started('frc')
    const stats = steps.run('statistics', () => statisticsOf(locs, inputs))
    const drift = steps.run('drift', () => estimateDrift(locs))
    send(thread, { type: 'drift', trajectory: drift.trajectory })
    const merge = steps.run('merge', () => mergeLocalizations(locs))
    const nena = steps.run('nena', () => estimateNenaPrecision(locs))
    const [frc, frcCorrected] = await Promise.all([replies.frc, replies.frcCorrected])
    onProgress(1, 'done')
    return assembleFindings(locs, inputs, { stats, merge, nena, frc, drift, frcCorrected })
  } finally {
    await thread.terminate()
  }
}

const send = (thread: Worker, message: FrcThreadRequest) => thread.postMessage(message)

function frcReplies(thread: Worker, steps: ReturnType<typeof stepTracker>) {
  let fail: (error: Error) => void = () => {}
  const failed = new Promise<never>((_, reject) => (fail = reject))
  failed.catch(() => {})
  const frc = new Promise<FrcResult>((resolve) =>
    thread.on('message', (reply: FrcThreadReply) => {
      if (reply.type === 'frc') {
        steps.finished('frc')
        resolve(reply.result)
      }
    }),
  )
  const frcCorrected = new Promise<FrcResult | null>((resolve) =>
    thread.on('message', (reply: FrcThreadReply) => {
      if (reply.type === 'frcCorrected') {
        steps.finished('frcCorrected')
        resolve(reply.result)
      } else if (reply.type === 'failed') fail(new Error(reply.message))
    }),
  )
  thread.on('error', fail)
  thread.on('exit', (code) => fail(new Error(`The FRC thread stopped (exit code ${code}).`)))
  return {
    frc: Promise.race([frc, failed]),
    frcCorrected: Promise.race([frcCorrected, failed]),
  }
}

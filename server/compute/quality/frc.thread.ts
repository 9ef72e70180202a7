/**
 * The second thread of a report: the FRC of the table as it is, then (once the first thread has
 * estimated the drift) the FRC after drift correction, on its own copy of the columns FRC reads.
 */
import { parentPort } from 'node:worker_threads'
import type { DriftTrajectory } from '../drift'
import { computeFrc } from '../frc'
import { driftCorrectedFrc } from './compute-quality'
import type { FrcColumns, FrcThreadReply, FrcThreadRequest } from './frc-thread.protocol'

const port = parentPort
if (!port) throw new Error('frc.thread.ts runs as a worker thread')
let locs: FrcColumns | null = null

function answer(message: FrcThreadRequest): FrcThreadReply {
  if (message.type === 'table') {
    locs = message.locs
    return { type: 'frc', result: computeFrc(locs) }
  }
  if (!locs) throw new Error('"drift" before "table"')
  const trajectory: DriftTrajectory | null = message.trajectory
  return { type: 'frcCorrected', result: driftCorrectedFrc(locs, trajectory) }
}

port.on('message', (message: FrcThreadRequest) => {
  try {
    port.postMessage(answer(message))
  } catch (error) {
    port.postMessage({ type: 'failed', message: String((error as Error)?.stack ?? error) })
  }
})

import { referenceScale, renderTilePng, type ScaleTask, type TileTask } from '../../compute/preview'

export type TileWorkerTask =
  ({ kind: 'tile' } & TileTask) | ({ kind: 'scale' } & ScaleTask) | { kind: 'warm' }

/** A tile-pool thread's one entry (Piscina calls the default export with each task). */
export default async function run(task: TileWorkerTask): Promise<Uint8Array | number | null> {
  if (task.kind === 'warm') return null
  return task.kind === 'tile' ? renderTilePng(task) : referenceScale(task)
}

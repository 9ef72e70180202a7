/**
 * `npm run bench`: every benchmark, each printed as one block plus a final JSON line.
 * Benchmarks are never part of `npm test`.
 */
import { benchCommentEvents } from './comment-events.bench'
import { benchDatasetList } from './datasets-list.bench'
import { benchDatasetListPostgresql } from './datasets-list-pg.bench'
import { benchIngest, benchIngestLarge } from './ingest.bench'
import { benchJobQueue } from './job-queue.bench'
import { benchQuality } from './quality.bench'
import { benchRawStack } from './raw-stack.bench'
import { benchRegions } from './regions.bench'
import { benchThreadStart } from './thread-start.bench'
import { benchTiles } from './tiles.bench'
import { benchUpload } from './upload.bench'
import { benchUploadS3 } from './upload-s3.bench'

const only = process.argv[2]
/** Run only when named (`npm run bench -- <name>`): they start servers of their own. */
const optIn: Record<string, () => Promise<Record<string, unknown>>> = {
  'datasets-list-pg': benchDatasetListPostgresql,
}
const benches: Record<string, () => Promise<Record<string, unknown>>> = {
  'comment-events': benchCommentEvents,
  'datasets-list': benchDatasetList,
  ingest: benchIngest,
  'ingest-large': benchIngestLarge,
  'job-queue': benchJobQueue,
  quality: benchQuality,
  'raw-stack': benchRawStack,
  regions: benchRegions,
  'thread-start': benchThreadStart,
  tiles: benchTiles,
  upload: benchUpload,
  'upload-s3': benchUploadS3,
}

const results: Record<string, unknown> = {}
const chosen = only && only in optIn ? { [only]: optIn[only]! } : benches
for (const [name, run] of Object.entries(chosen)) {
  if (only && only !== name) continue
  process.stdout.write(`\n== ${name} ==\n`)
  const figures = await run()
  for (const [k, v] of Object.entries(figures))
    process.stdout.write(`${k.padStart(18)}: ${String(v)}\n`)
  results[name] = figures
}
process.stdout.write(`JSON ${JSON.stringify(results)}\n`)

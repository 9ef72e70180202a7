import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { JobCompletion } from '../../jobs/job-runner'
import type { IJob } from '../../jobs/job.entity'
import { importOmeXml } from '../metadata/ome/ome-import'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { enqueue } from '../../jobs/job-queue'
import { scanRawStackJob } from './file-job-kinds'
import type { RawStackReport } from './raw-stack.work'
import { rejectOnFailure } from './file-job-failure'
import { tableCompletions, type IngestSettings } from './table-jobs.completions'

async function fileOf(em: EntityManager, job: IJob) {
  return job.file == null ? null : em.findOne(DatasetFile, { id: job.file })
}

/**
 * A multi-file OME-TIFF names its parts in its OME-XML. Until all have arrived the file says which
 * are missing; when they have, the whole stack is scanned once more, over all parts in plane order.
 */
async function multiFilePart(
  em: EntityManager,
  file: IDatasetFile,
  report: RawStackReport,
  job: IJob,
): Promise<string | null> {
  const payload = scanRawStackJob.payload.parse(job.payload)
  if (report.fileSet.length < 2 || payload.partKeys) return null
  const siblings = await em.find(DatasetFile, {
    dataset: file.dataset,
    name: { $in: report.fileSet },
  })
  const byName = new Map(siblings.map((f) => [f.name, f]))
  const missing = report.fileSet.filter((n) => !byName.has(n))
  if (missing.length)
    return `Part of a multi-file OME-TIFF; still to upload: ${missing.join(', ')}.`
  const partKeys = report.fileSet.map((n) => byName.get(n)!.storageKey)
  await enqueue(em, scanRawStackJob, { ...payload, partKeys })
  file.status = 'processing'
  return null
}

const scanRawStack: JobCompletion = {
  async done(em, job, result) {
    const file = await fileOf(em, job)
    if (!file) return
    const { derivedBytes, ...report } = result as RawStackReport & { derivedBytes: number }
    file.derivedBytes = derivedBytes
    // Embedded OME-XML becomes a prefill the depositor reviews before it touches the description.
    let omePrefill: unknown = null
    if (report.omeXml) {
      try {
        omePrefill = importOmeXml(report.omeXml)
      } catch (err) {
        omePrefill = { error: err instanceof Error ? err.message : String(err) }
      }
    }
    file.report = { ...report, omeXml: undefined, hasOmeXml: report.omeXml !== null, omePrefill }
    file.status = 'ready'
    file.problem = await multiFilePart(em, file, report, job)
  },
  failed: rejectOnFailure,
}

export function fileJobCompletions(settings: IngestSettings): Record<string, JobCompletion> {
  return { [scanRawStackJob.name]: scanRawStack, ...tableCompletions(settings) }
}

/**
 * Job throughput on the PostgreSQL profile (issue 17, performance): many small tables deposited
 * while no node takes jobs, then one node, or two nodes on the same database, work through their
 * jobs (inspect, ingest, quality report: three a table) through pg-boss. Each node has one worker
 * thread, as JOB_WORKERS=1 gives. The nodes share this process (and the machine's cores): the
 * figure is the queue's hand-over between nodes, not a second machine's cores. A second figure
 * times probe jobs that do almost nothing, in threads that stay: the queue's own cost per job.
 * Figures only.
 */
import { createJobRunner } from '@server/jobs/background-jobs'
import { enqueue } from '@server/jobs/job-queue'
import { queueProbeJob } from '@server/jobs/queue-probe.job'
import { Job } from '@server/jobs/job.entity'
import { FRESH_THREAD_KINDS } from '@server/jobs/kinds'
import { createLogger } from '@server/logger'
import { fileJobCompletions } from '@server/modules/files/file-jobs.completions'
import { qualityCompletions } from '@server/modules/quality/quality.completions'
import { buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { listen } from '../fixtures/live-server'
import { createTestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

const TABLES = 30
const PROBES = 300

const table = (seed: number) =>
  'frame,x [nm],y [nm],photons\n' +
  Array.from({ length: 200 }, (_, i) => `${i + 1},${seed + i * 3.5},${seed * 2 + i},1500`).join(
    '\n',
  )

/** Seconds for `nodes` nodes to finish every job of TABLES freshly deposited tables (or PROBES probes). */
async function drain(
  nodes: number,
  work: 'tables' | 'probes',
): Promise<{ seconds: number; jobs: number }> {
  const t = await createTestApp({}, { database: 'postgresql' })
  const live = await listen(t.app)
  try {
    const em = t.em()
    const member = await buildMember(em)
    const project = await buildProject(em, [{ user: member, role: 'member' }])
    const token = await tokenFor(em, member)
    const { accession } = await buildDataset(em, project.id)
    if (work === 'probes')
      for (let i = 0; i < PROBES; i++) await enqueue(t.em(), queueProbeJob, { ms: 5 })
    else
      for (let i = 0; i < TABLES; i++)
        await tusUpload(`${live.url}/api/uploads`, token, Buffer.from(table(i)), {
          dataset: accession,
          filename: `t${i}.csv`,
        })
    const started = performance.now()
    const runners = Array.from({ length: nodes }, () =>
      createJobRunner({
        orm: t.orm,
        logger: createLogger('silent'),
        dataDir: t.config.dataDir,
        workers: 1,
        pollMs: 100,
        completions: { ...fileJobCompletions(t.config), ...qualityCompletions() },
        // Probes run two at a time in each node: their threads stay, so the queue is what counts.
        ...(work === 'probes' && { workers: 2 }),
        freshThreadKinds: FRESH_THREAD_KINDS,
      }),
    )
    runners.forEach((r) => r.start())
    const open = () => t.em().count(Job, { state: { $in: ['queued', 'running'] } })
    while ((await open()) > 0) await new Promise((r) => setTimeout(r, 100))
    const seconds = (performance.now() - started) / 1000
    await Promise.all(runners.map((r) => r.stop()))
    return { seconds, jobs: await t.em().count(Job, { state: 'done' }) }
  } finally {
    await live.close()
    await t.close()
  }
}

export async function benchJobQueue(): Promise<Record<string, unknown>> {
  const one = await drain(1, 'tables')
  const two = await drain(2, 'tables')
  const probesOne = await drain(1, 'probes')
  const probesTwo = await drain(2, 'probes')
  const rate = (r: { seconds: number; jobs: number }) => (r.jobs / r.seconds).toFixed(2)
  return {
    tables: TABLES,
    jobsDone: `${one.jobs} / ${two.jobs}`,
    oneNodeJobsPerS: rate(one),
    twoNodesJobsPerS: rate(two),
    speedUp: (one.seconds / two.seconds).toFixed(2),
    probes: `${probesOne.jobs} / ${probesTwo.jobs}`,
    oneNodeProbesPerS: rate(probesOne),
    twoNodesProbesPerS: rate(probesTwo),
  }
}

// @vitest-environment node
import { fileURLToPath } from 'node:url'
import madge from 'madge'
import { describe, expect, it } from 'vitest'

const root = fileURLToPath(new URL('../../../', import.meta.url))

/** The import graph of server/, as madge (a well-known dependency-graph tool) reads it. */
function serverGraph() {
  return madge(`${root}server`, {
    fileExtensions: ['ts'],
    tsConfig: `${root}tsconfig.json`,
    detectiveOptions: { ts: { skipTypeImports: false } },
  })
}

describe('server/compute stays an engine room', () => {
  it('has no import cycle in server/compute, type-only imports included', async () => {
    const graph = await serverGraph()
    expect(graph.obj()['compute/ingest/ingest.service.ts']).toContain(
      'compute/ingest/output.writer.ts',
    )
    const cycles = graph.circular().filter((cycle) => cycle.some((f) => f.startsWith('compute/')))
    expect(cycles).toEqual([])
  }, 60_000)

  it('imports neither HTTP, the ORM, the job framework nor a feature module', async () => {
    const graph = (await serverGraph()).obj()
    const offending = Object.entries(graph)
      .filter(([file]) => file.startsWith('compute/'))
      .flatMap(([file, deps]) =>
        deps.filter((dep) => /^(modules|http|jobs|db)\b/.test(dep)).map((d) => `${file} → ${d}`),
      )
    expect(offending).toEqual([])
  }, 60_000)
})

/**
 * Live discussion under load (issue: regions of interest, performance): with 100 event streams open
 * on one dataset, how long a new comment takes from its POST to each open page. Stipple runs as in
 * production (two HTTP processes), so the streams sit on both and every comment crosses the
 * cluster's fan-out. Figures only.
 */
import { request } from 'node:http'
import { withDatasets, startServer } from './bench-server'

const STREAMS = 100
const COMMENTS = 60
const GAP_MS = 100

interface Stream {
  /** Sent-at times of comments by their text, looked up when an event arrives. */
  close: () => void
}

/** One open page: a GET on the event stream, reporting each comment's arrival. */
function openStream(
  url: string,
  token: string,
  onComment: (body: string, at: number) => void,
): Promise<Stream> {
  return new Promise((resolve, reject) => {
    const req = request(
      url,
      { headers: { authorization: `Bearer ${token}`, accept: 'text/event-stream' } },
      (res) => {
        if (res.statusCode !== 200) return reject(new Error(`event stream: ${res.statusCode}`))
        let pending = ''
        res.setEncoding('utf8')
        res.on('data', (chunk: string) => {
          const at = performance.now()
          pending += chunk
          let end
          while ((end = pending.indexOf('\n\n')) >= 0) {
            const event = pending.slice(0, end)
            pending = pending.slice(end + 2)
            const data = /^data: (.*)$/m.exec(event)?.[1]
            if (event.startsWith('event: comment.created') && data)
              onComment((JSON.parse(data) as { body: string }).body, at)
          }
        })
        resolve({ close: () => req.destroy() })
      },
    )
    req.on('error', reject)
    req.end()
  })
}

const quantile = (sorted: number[], q: number) =>
  sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))]!

export async function benchCommentEvents(): Promise<Record<string, unknown>> {
  return withDatasets(2_000, async (dir, people) => {
    const server = await startServer(dir, 2, { RATE_LIMIT_COMMENTS: '10000' })
    const streams: Stream[] = []
    try {
      const asDepositor = { authorization: `Bearer ${people.depositor}` }
      const list = (await (
        await fetch(`${server.url}/api/datasets?limit=100&sort=title`, { headers: asDepositor })
      ).json()) as { items: { id: number; state: string }[] }
      // A draft of the depositor's project: open to their comments.
      const datasetId = list.items.find((d) => d.state === 'draft')!.id
      const sent = new Map<string, number>()
      const delays: number[] = []
      const record = (body: string, at: number) => {
        const t = sent.get(body)
        if (t !== undefined) delays.push(at - t)
      }
      // Half the pages are the depositor's colleagues' (same project), half a steward's.
      for (let i = 0; i < STREAMS; i++) {
        const token = i % 2 ? people.steward : people.depositor
        streams.push(
          await openStream(`${server.url}/api/datasets/${datasetId}/events`, token, record),
        )
      }
      for (let i = 0; i < COMMENTS; i++) {
        const body = `Bench comment ${i}: is this cluster a single pore?`
        sent.set(body, performance.now())
        const res = await fetch(`${server.url}/api/datasets/${datasetId}/comments`, {
          method: 'POST',
          headers: { ...asDepositor, 'content-type': 'application/json' },
          body: JSON.stringify({ body }),
        })
        if (res.status !== 201) throw new Error(`comment: ${res.status} ${await res.text()}`)
        await new Promise((r) => setTimeout(r, GAP_MS))
      }
      await new Promise((r) => setTimeout(r, 2000))
      const sorted = delays.sort((a, b) => a - b)
      const expected = STREAMS * COMMENTS
      return {
        'comment → 100 open pages': `p50 ${quantile(sorted, 0.5).toFixed(1)} / p95 ${quantile(sorted, 0.95).toFixed(1)} / max ${sorted.at(-1)!.toFixed(1)} ms (${sorted.length} of ${expected} deliveries, 2 HTTP processes)`,
        'events target': 'p95 < 1000 ms',
        'events target met': sorted.length === expected && quantile(sorted, 0.95) < 1000,
      }
    } finally {
      for (const s of streams) s.close()
      await server.stop()
    }
  })
}

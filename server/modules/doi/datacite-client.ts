import type { AppConfig } from '../../config'

/** What the DataCite REST API answered, reduced to what the registrar records. */
export type DataCiteOutcome =
  { ok: true; doi: string; state: string } | { ok: false; error: string }

const JSON_API = 'application/vnd.api+json'

/** DataCite's own error titles, or the status line: never our credentials or internals. */
async function describeFailure(res: Response): Promise<string> {
  const body = (await res.json().catch(() => null)) as {
    errors?: { title?: string; source?: string }[]
  } | null
  const titles = (body?.errors ?? [])
    .map((e) => [e.source, e.title].filter(Boolean).join(': '))
    .filter(Boolean)
    .slice(0, 5)
  return `DataCite answered ${res.status}${titles.length ? `: ${titles.join('; ')}` : ''}`
}

/**
 * Registers (or, when DataCite already has it, updates) a findable DOI: `POST /dois`, then
 * `PUT /dois/{doi}` when the DOI was taken by an earlier attempt whose answer never arrived.
 * The same code talks to the local stand-in and to DataCite; only the configuration differs.
 */
export async function publishDoi(
  target: { url: string } & Pick<AppConfig['datacite'], 'repositoryId' | 'password'>,
  body: { data: { attributes: { doi: string } } },
  timeoutMs = 15_000,
): Promise<DataCiteOutcome> {
  const headers = {
    'content-type': JSON_API,
    accept: JSON_API,
    authorization: `Basic ${Buffer.from(`${target.repositoryId}:${target.password}`).toString('base64')}`,
  }
  const send = (method: 'POST' | 'PUT', path: string) =>
    fetch(`${target.url}${path}`, {
      method,
      headers,
      body: JSON.stringify(body),
      signal: AbortSignal.timeout(timeoutMs),
    })
  try {
    let res = await send('POST', '/dois')
    if (res.status === 422) {
      const problem = await describeFailure(res.clone())
      if (/already been taken/i.test(problem))
        res = await send('PUT', `/dois/${body.data.attributes.doi}`)
    }
    if (!res.ok) return { ok: false, error: await describeFailure(res) }
    const answer = (await res.json()) as { data?: { id?: string; attributes?: { state?: string } } }
    return {
      ok: true,
      doi: answer.data?.id ?? body.data.attributes.doi,
      state: answer.data?.attributes?.state ?? '',
    }
  } catch (err) {
    const reason =
      err instanceof Error && err.name === 'TimeoutError'
        ? 'no answer in time'
        : 'could not connect'
    return { ok: false, error: `DataCite unreachable (${reason})` }
  }
}

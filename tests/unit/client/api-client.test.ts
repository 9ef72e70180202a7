import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiError, api, errorMessage } from '@/api/client'

function answer(status: number, body: unknown, type = 'application/problem+json') {
  return new Response(body === undefined ? null : JSON.stringify(body), {
    status,
    headers: { 'content-type': type },
  })
}

afterEach(() => vi.unstubAllGlobals())

describe('api client', () => {
  it('turns a problem+json 400 into an ApiError with messages keyed by field name', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () =>
        answer(400, {
          type: 'https://stipple.example/problems/validation',
          title: 'Invalid request',
          status: 400,
          detail: 'The request body has missing or invalid fields.',
          errors: [
            { pointer: '#/title', detail: 'Title needs at least 3 characters' },
            { pointer: '#/title', detail: 'A second complaint about the title' },
            { pointer: '#/authors/0/orcid', detail: 'Not an ORCID iD' },
          ],
        }),
      ),
    )

    const error = await api.post('/api/datasets', { title: 'x' }).catch((e: unknown) => e)

    expect(error).toBeInstanceOf(ApiError)
    const apiError = error as ApiError
    expect(apiError.status).toBe(400)
    expect(apiError.title).toBe('Invalid request')
    expect(apiError.fieldErrors).toEqual({
      title: 'Title needs at least 3 characters',
      'authors.0.orcid': 'Not an ORCID iD',
    })
    expect(errorMessage(apiError)).toBe('The request body has missing or invalid fields.')
  })

  it('sends JSON with same-origin credentials and leaves empty query values out', async () => {
    const fetchMock = vi.fn(async () => answer(200, { items: [], total: 0 }, 'application/json'))
    vi.stubGlobal('fetch', fetchMock)

    await api.get('/api/datasets', { limit: 25, q: '', state: undefined, projectId: 3 })

    const [url, init] = fetchMock.mock.calls[0] as unknown as [string, RequestInit]
    expect(url).toBe('/api/datasets?limit=25&projectId=3')
    expect(init.credentials).toBe('same-origin')
    expect(init.method).toBe('GET')
  })

  it('answers undefined for 204 No Content', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => new Response(null, { status: 204 })),
    )
    await expect(api.delete('/api/me/tokens/4')).resolves.toBeUndefined()
  })

  it('reports a non-problem error body by its status, and a dropped connection as status 0', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => new Response('<html>', { status: 502 })),
    )
    const bad = (await api.get('/api/me').catch((e: unknown) => e)) as ApiError
    expect(bad.status).toBe(502)

    vi.stubGlobal(
      'fetch',
      vi.fn(async () => Promise.reject(new TypeError('Failed to fetch'))),
    )
    const offline = (await api.get('/api/me').catch((e: unknown) => e)) as ApiError
    expect(offline).toBeInstanceOf(ApiError)
    expect(offline.status).toBe(0)
  })
})

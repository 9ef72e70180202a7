/**
 * Abilities are built once per identity and clock second (server/http/authenticate.ts). An embargo
 * must therefore end on time within that second: never early, at most a second late. The public
 * may download a released dataset and not an embargoed one (shared/permissions/matrix.ts).
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { buildDataset, buildProject } from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
beforeAll(async () => {
  t = await createTestApp()
})
afterAll(() => t.close())

describe('the end of an embargo, with abilities reused within a second', () => {
  it('keeps files closed until the embargo ends and opens them within a second after', async () => {
    const project = await buildProject(t.em(), [])
    const endsAt = Date.now() + 1500
    const dataset = await buildDataset(t.em(), project.id, {
      state: 'approved',
      embargoUntil: new Date(endsAt),
    })
    const manifest = () => request(t.app).get(`/api/datasets/${dataset.accession}/manifest.txt`)
    const seen: { at: number; status: number }[] = []
    while (Date.now() < endsAt + 2500) {
      const at = Date.now()
      seen.push({ at, status: (await manifest()).status })
      await new Promise((r) => setTimeout(r, 50))
    }
    // Before the end: never open. From one second after it: always open.
    expect(seen.filter((s) => s.at < endsAt).every((s) => s.status !== 200)).toBe(true)
    expect(seen.filter((s) => s.at >= endsAt + 1000).every((s) => s.status === 200)).toBe(true)
    expect(seen.some((s) => s.status === 200)).toBe(true)
  })
})

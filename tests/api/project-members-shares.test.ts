/**
 * Sharing one dataset with someone does not make them a member of the whole project: the
 * project's member list leaves them out, and the dataset's shares list them.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { bearer, buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
beforeAll(async () => {
  t = await createTestApp()
})
afterAll(() => t.close())

describe('project members and dataset shares', () => {
  it('lists a person with a dataset share under the dataset, not among the project members', async () => {
    const em = t.em()
    const owner = await buildMember(em)
    const member = await buildMember(em)
    const project = await buildProject(em, [
      { user: owner, role: 'owner' },
      { user: member, role: 'member' },
    ])
    const dataset = await buildDataset(em, project.id, { createdBy: owner.id })
    const ownerToken = await tokenFor(em, owner)

    await request(t.app)
      .post(`/api/datasets/${dataset.id}/shares`)
      .set(bearer(ownerToken))
      .send({ email: 'visiting.scientist@elsewhere.test', capabilities: ['preview'] })
      .expect(201)
    // An owner may still add a collaborator to the project by hand: that one is a member.
    await request(t.app)
      .post(`/api/projects/${project.id}/members`)
      .set(bearer(ownerToken))
      .send({ email: 'named.collaborator@elsewhere.test', role: 'collaborator' })
      .expect(201)

    const members = (
      await request(t.app).get(`/api/projects/${project.id}/members`).set(bearer(ownerToken))
    ).body.items.map((m: { email: string }) => m.email)
    expect(members).toEqual([owner.email, member.email, 'named.collaborator@elsewhere.test'])

    const detail = await request(t.app).get(`/api/projects/${project.id}`).set(bearer(ownerToken))
    expect(detail.body.members.map((m: { email: string }) => m.email)).not.toContain(
      'visiting.scientist@elsewhere.test',
    )

    const shares = (
      await request(t.app).get(`/api/datasets/${dataset.id}/shares`).set(bearer(ownerToken))
    ).body.items.map((s: { email: string }) => s.email)
    expect(shares).toEqual(['visiting.scientist@elsewhere.test'])
  })
})

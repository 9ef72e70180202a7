import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import type { MeDto } from '@shared/schemas/user.schema'
import { fetchMe } from '@/api/me'
import { useNavigation } from '@/composables/useNavigation'
import { useSessionStore } from '@/stores/session.store'

vi.mock('@/api/me', () => ({ fetchMe: vi.fn() }))
const fetchMeMock = vi.mocked(fetchMe)

/** A signed-in person of a site role, with the viewer the server would send for them. */
const person = (id: number, siteRole: 'editor' | 'steward' | null): MeDto => ({
  user: { id, email: `p${id}@lab.example`, name: `Person ${id}`, siteRole, organization: null },
  viewer: { id, siteRole, organizationId: null, memberships: [], shares: [] },
  demo: false,
})

async function titlesFor(me: MeDto) {
  fetchMeMock.mockResolvedValue(me)
  await useSessionStore().load()
  return useNavigation().value.map((item) => item.title)
}

beforeEach(() => {
  setActivePinia(createPinia())
  fetchMeMock.mockReset()
})

describe('the main navigation', () => {
  it("gives an editor their manuscripts and the statement check, not the steward's log", async () => {
    const titles = await titlesFor(person(3, 'editor'))
    expect(titles).toContain('Manuscripts')
    expect(titles).toContain('Check a statement')
    expect(titles).not.toContain('Audit log')
  })

  it('gives a steward the audit log and no editor pages', async () => {
    const titles = await titlesFor(person(4, 'steward'))
    expect(titles).toContain('Audit log')
    expect(titles).not.toContain('Manuscripts')
  })

  it('shows the signed-out public only what is public', async () => {
    const titles = await titlesFor({ user: null, viewer: null, demo: false })
    expect(titles).toEqual(['Home', 'Datasets', 'Public datasets'])
  })
})

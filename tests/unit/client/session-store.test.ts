import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import type { MeDto } from '@shared/schemas/user.schema'
import { fetchMe } from '@/api/me'
import { useSessionStore } from '@/stores/session.store'
import { newDraftIn } from '@/utils/dataset'

vi.mock('@/api/me', () => ({ fetchMe: vi.fn() }))
const fetchMeMock = vi.mocked(fetchMe)

const depositor: MeDto = {
  user: {
    id: 5,
    email: 'depositor@lab.example',
    name: 'A Depositor',
    siteRole: null,
    organization: { id: 2, name: 'A lab' },
  },
  viewer: {
    id: 5,
    siteRole: null,
    organizationId: 2,
    memberships: [{ projectId: 7, role: 'member' }],
    shares: [],
  },
  demo: false,
}
const signedOut: MeDto = { user: null, viewer: null, demo: true }

beforeEach(() => {
  setActivePinia(createPinia())
  fetchMeMock.mockReset()
})

describe('session store', () => {
  it('builds an ability where a depositor can create datasets in their own project only', async () => {
    fetchMeMock.mockResolvedValue(depositor)
    const session = useSessionStore()
    await session.load()

    expect(session.signedIn).toBe(true)
    expect(session.user?.name).toBe('A Depositor')
    expect(session.ability.can('create', newDraftIn(7))).toBe(true)
    expect(session.ability.can('create', newDraftIn(8))).toBe(false)
    expect(session.ability.can('create', 'Project')).toBe(true)
  })

  it('gives the signed-out public no right to create anything', async () => {
    fetchMeMock.mockResolvedValue(signedOut)
    const session = useSessionStore()
    await session.load()

    expect(session.signedIn).toBe(false)
    expect(session.demo).toBe(true)
    expect(session.ability.can('create', newDraftIn(7))).toBe(false)
    expect(session.ability.can('create', 'Project')).toBe(false)
  })

  it('asks the server once however often it is loaded', async () => {
    fetchMeMock.mockResolvedValue(signedOut)
    const session = useSessionStore()
    await Promise.all([session.load(), session.load()])
    await session.load()
    expect(fetchMeMock).toHaveBeenCalledTimes(1)
  })

  it('keeps the error words and treats the person as signed out when the server fails', async () => {
    fetchMeMock.mockRejectedValue(new Error('Stipple could not be reached.'))
    const session = useSessionStore()
    await session.load()
    expect(session.error).toBe('Stipple could not be reached.')
    expect(session.signedIn).toBe(false)
    expect(session.ability.can('create', newDraftIn(7))).toBe(false)
  })
})

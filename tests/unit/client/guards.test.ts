import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { MeDto } from '@shared/schemas/user.schema'
import { fetchMe } from '@/api/me'
import { requireSignIn, signInUrl } from '@/router/guards'

vi.mock('@/api/me', () => ({ fetchMe: vi.fn() }))
const fetchMeMock = vi.mocked(fetchMe)

const Page = { template: '<div />' }
function routerWith(leave: (url: string) => void) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: Page },
      { path: '/profile', component: Page, meta: { requiresAuth: true } },
    ],
  })
  router.beforeEach(requireSignIn(leave))
  return router
}

const member: MeDto = {
  user: { id: 1, email: 'm@lab.example', name: 'M', siteRole: null, organization: null },
  viewer: { id: 1, siteRole: null, organizationId: null, memberships: [], shares: [] },
  demo: false,
}

beforeEach(() => {
  setActivePinia(createPinia())
  fetchMeMock.mockReset()
})

describe('sign-in guard', () => {
  it('sends a signed-out visitor of a guarded page to sign in, returning to that page', async () => {
    fetchMeMock.mockResolvedValue({ user: null, viewer: null, demo: false })
    const leave = vi.fn()
    const router = routerWith(leave)

    await router.push('/profile?tab=tokens')

    expect(leave).toHaveBeenCalledWith('/profile?tab=tokens')
    expect(router.currentRoute.value.path).not.toBe('/profile')
    expect(signInUrl('/profile?tab=tokens')).toBe('/auth/login?returnTo=%2Fprofile%3Ftab%3Dtokens')
  })

  it('lets a signed-in person through, and anyone onto public pages', async () => {
    fetchMeMock.mockResolvedValue(member)
    const leave = vi.fn()
    const router = routerWith(leave)

    await router.push('/profile')
    expect(router.currentRoute.value.path).toBe('/profile')
    await router.push('/')
    expect(router.currentRoute.value.path).toBe('/')
    expect(leave).not.toHaveBeenCalled()
  })
})

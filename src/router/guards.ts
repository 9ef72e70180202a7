import type { NavigationGuard, Router } from 'vue-router'
import { useSessionStore } from '@/stores/session.store'

/** Where the server starts a sign-in that comes back to `returnTo` (a path on this site). */
export function signInUrl(returnTo: string): string {
  return `/auth/login?returnTo=${encodeURIComponent(returnTo)}`
}

/** Sign-in is a full-page visit to the server, which hands over to the identity provider. */
export function goToSignIn(returnTo: string): void {
  window.location.assign(signInUrl(returnTo))
}

export function requireSignIn(leave: (url: string) => void = goToSignIn): NavigationGuard {
  return async (to) => {
    const session = useSessionStore()
    await session.load()
    // When the session itself failed to load, stay: the page shows the error and a retry.
    if (to.meta.requiresAuth && !session.signedIn && !session.error) {
      leave(to.fullPath)
      return false
    }
    return true
  }
}

export function installGuards(router: Router): void {
  router.beforeEach(requireSignIn())
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Stipple` : 'Stipple'
  })
}

import { computed } from 'vue'
import type { RouteLocationRaw } from 'vue-router'
import {
  mdiAccountMultipleOutline,
  mdiAccountCircleOutline,
  mdiBookOpenPageVariantOutline,
  mdiDatabaseOutline,
  mdiEmailOutline,
  mdiFolderMultipleOutline,
  mdiHistory,
  mdiHomeOutline,
  mdiMagnify,
  mdiTextSearch,
} from '@mdi/js'
import { useSessionStore } from '@/stores/session.store'

export interface NavItem {
  title: string
  to: RouteLocationRaw
  icon: string
  exact?: boolean
}

/** The main navigation, showing only the pages this person can use. */
export function useNavigation() {
  const session = useSessionStore()
  return computed<NavItem[]>(() => {
    const can = session.ability.can.bind(session.ability)
    const items: NavItem[] = [
      { title: 'Home', to: { name: 'home' }, icon: mdiHomeOutline, exact: true },
      { title: 'Datasets', to: { name: 'datasets' }, icon: mdiDatabaseOutline },
      { title: 'Public datasets', to: { name: 'public-search' }, icon: mdiMagnify },
    ]
    if (session.signedIn) {
      items.push(
        { title: 'Projects', to: { name: 'projects' }, icon: mdiFolderMultipleOutline },
        { title: 'Profile', to: { name: 'profile' }, icon: mdiAccountCircleOutline },
      )
    }
    // An editor's own pages, reachable from anywhere, not only from the home page's cards.
    if (session.user?.siteRole === 'editor') {
      items.push(
        { title: 'Manuscripts', to: { name: 'manuscripts' }, icon: mdiBookOpenPageVariantOutline },
        { title: 'Check a statement', to: { name: 'link-check' }, icon: mdiTextSearch },
      )
    }
    if (session.demo && can('read', 'Mail')) {
      items.push({ title: 'Caught mail', to: { name: 'caught-mail' }, icon: mdiEmailOutline })
    }
    if (can('manage', 'User')) {
      items.push({ title: 'Users', to: { name: 'admin-users' }, icon: mdiAccountMultipleOutline })
    }
    if (can('read', 'AuditEvent')) {
      items.push({ title: 'Audit log', to: { name: 'audit-log' }, icon: mdiHistory })
    }
    return items
  })
}

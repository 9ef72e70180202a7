import type { RouteRecordRaw } from 'vue-router'

declare module 'vue-router' {
  interface RouteMeta {
    /** Signed-out visitors are sent to sign in, and brought back here afterwards. */
    requiresAuth?: boolean
    title?: string
  }
}

export const routes: RouteRecordRaw[] = [
  { path: '/', name: 'home', component: () => import('@/views/HomeView.vue') },
  {
    path: '/datasets',
    name: 'datasets',
    component: () => import('@/views/DatasetsView.vue'),
    meta: { title: 'Datasets' },
  },
  {
    path: '/search',
    name: 'public-search',
    component: () => import('@/views/PublicSearchView.vue'),
    meta: { title: 'Public datasets' },
  },
  {
    path: '/datasets/new',
    name: 'dataset-new',
    component: () => import('@/views/DatasetCreateView.vue'),
    meta: { requiresAuth: true, title: 'New dataset' },
  },
  {
    path: '/datasets/:idOrAccession',
    name: 'dataset',
    component: () => import('@/views/DatasetView.vue'),
    props: true,
  },
  {
    path: '/datasets/:idOrAccession/edit',
    name: 'dataset-edit',
    component: () => import('@/views/DatasetEditView.vue'),
    props: true,
    meta: { requiresAuth: true, title: 'Edit dataset' },
  },
  {
    path: '/datasets/:idOrAccession/describe',
    name: 'dataset-describe',
    component: () => import('@/views/DatasetMetadataView.vue'),
    props: true,
    meta: { title: 'Describe dataset' },
  },
  {
    path: '/datasets/:idOrAccession/files/:fileId(\\d+)',
    name: 'file-quality',
    component: () => import('@/views/FileQualityView.vue'),
    props: (route) => ({
      idOrAccession: String(route.params.idOrAccession),
      fileId: Number(route.params.fileId),
    }),
    meta: { title: 'Quality and preview' },
  },
  {
    path: '/projects',
    name: 'projects',
    component: () => import('@/views/ProjectsView.vue'),
    meta: { requiresAuth: true, title: 'Projects' },
  },
  {
    path: '/projects/:id(\\d+)',
    name: 'project',
    component: () => import('@/views/ProjectView.vue'),
    props: (route) => ({ id: Number(route.params.id) }),
    meta: { requiresAuth: true },
  },
  {
    path: '/profile',
    name: 'profile',
    component: () => import('@/views/ProfileView.vue'),
    meta: { requiresAuth: true, title: 'Profile' },
  },
  {
    path: '/admin/mail',
    name: 'caught-mail',
    component: () => import('@/views/CaughtMailView.vue'),
    meta: { requiresAuth: true, title: 'Caught mail' },
  },
  {
    path: '/admin/audit',
    name: 'audit-log',
    component: () => import('@/views/AuditLogView.vue'),
    meta: { requiresAuth: true, title: 'Audit log' },
  },
  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@/views/AdminUsersView.vue'),
    meta: { requiresAuth: true, title: 'Users' },
  },
  {
    path: '/manuscripts',
    name: 'manuscripts',
    component: () => import('@/views/ManuscriptsView.vue'),
    meta: { requiresAuth: true, title: 'Manuscripts' },
  },
  {
    path: '/link-check',
    name: 'link-check',
    component: () => import('@/views/LinkCheckView.vue'),
    meta: { requiresAuth: true, title: 'Check a statement' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/views/NotFoundView.vue'),
    meta: { title: 'Not found' },
  },
]

import { fileURLToPath, URL } from 'node:url'
import vue from '@vitejs/plugin-vue'
import vuetify from 'vite-plugin-vuetify'
import { defineConfig } from 'vitest/config'

const alias = {
  '@': fileURLToPath(new URL('./src', import.meta.url)),
  '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
  '@server': fileURLToPath(new URL('./server', import.meta.url)),
}

// In development the browser talks to Vite only; everything the server owns is proxied to it.
const serverUrl = process.env.STIPPLE_DEV_SERVER ?? 'http://localhost:3000'
const proxied = ['/api', '/auth', '/oidc', '/idp', '/.well-known']

/**
 * API test files run a second time on PostgreSQL by `npm test` (see the api-postgresql project).
 * Of the 36 files whose app takes its database from the test profile (createTestApp, the
 * shared-draft app; the others choose theirs themselves), all took 11 min 14 s alone on the
 * shared two-core machine (05 Dec 2026, load 4 to 9), over the ~6 minutes allowed; this half
 * took 7 min 48 s there (load 7 to 8; 4.5 CPU-minutes), chosen for the SQL it reaches
 * (permissions, the list and search, the release, jobs, tiles, regions, JSON metadata, audit,
 * quotas, transactions) and leaving out files whose time goes to computing rather than to SQL.
 * All of them: `npm run test:api:postgresql`.
 */
const POSTGRESQL_API_FILES = [
  'admin-users',
  'audit-trail',
  'dataset-lifecycle',
  'datasets',
  'datasets-list',
  'doi',
  'downloads',
  'embargo-schedule',
  'file-processing',
  'hostile-input',
  'manuscripts',
  'metadata',
  'permission-matrix',
  'preview',
  'projects',
  'public-search',
  'regions',
  'reviewer-links',
  'tokens',
  'upload-integrity',
  'uploads',
]

export default defineConfig({
  plugins: [vue(), vuetify({ autoImport: true })],
  resolve: { alias },
  server: {
    port: 5173,
    proxy: Object.fromEntries(proxied.map((path) => [path, { target: serverUrl, xfwd: true }])),
  },
  build: { outDir: 'dist/client', emptyOutDir: true, chunkSizeWarningLimit: 1500 },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'happy-dom',
          server: { deps: { inline: ['vuetify'] } },
        },
      },
      {
        extends: true,
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 30_000,
        },
      },
      {
        extends: true,
        test: {
          // The same API tests on the cluster profile's database: a representative half.
          name: 'api-postgresql',
          include: POSTGRESQL_API_FILES.map((name) => `tests/api/${name}.test.ts`),
          env: { STIPPLE_TEST_PROFILE: 'postgresql' },
          environment: 'node',
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          // Real server processes killed and restarted: run alone, so timing is not starved by other tests.
          name: 'faults',
          include: ['tests/faults/**/*.test.ts'],
          environment: 'node',
          testTimeout: 300_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          testTimeout: 120_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
})

import { computeCompleteness } from '@shared/metadata/completeness'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import type { ProjectDto } from '@shared/schemas/project.schema'
import type { MeDto } from '@shared/schemas/user.schema'

/** Small, made-up API answers for drawing pages in tests. */
export const dataset: DatasetDto = {
  id: 1,
  accession: 'STPL-000001',
  title: 'Nuclear pores imaged by dSTORM',
  description: 'Two colours, 40 000 frames.',
  project: { id: 7, name: 'Pore complexes' },
  state: 'submitted',
  embargoUntil: null,
  proposedEmbargoUntil: '2030-01-01',
  licence: 'CC-BY-4.0',
  version: 1,
  createdBy: { id: 5, name: 'A Depositor' },
  createdAt: '2026-01-01T10:00:00Z',
  updatedAt: '2026-01-02T10:00:00Z',
  submittedAt: '2026-01-02T10:00:00Z',
  approvedAt: null,
}
export const project: ProjectDto = {
  id: 7,
  name: 'Pore complexes',
  description: 'Nuclear pore architecture.',
  organization: { id: 2, name: 'A lab' },
  myRole: 'owner',
  datasetCount: 1,
  createdAt: '2026-01-01T00:00:00Z',
}
export const signedIn: MeDto = {
  user: {
    id: 5,
    email: 'o@lab.example',
    name: 'An Owner',
    siteRole: 'admin',
    organization: { id: 2, name: 'A lab' },
  },
  viewer: {
    id: 5,
    siteRole: 'admin',
    organizationId: 2,
    memberships: [{ projectId: 7, role: 'owner' }],
    shares: [],
  },
  demo: true,
}

/** The API as the pages see it: just enough answers to draw every page. */
export function answerFor(url: string, me: MeDto, shown: DatasetDto): unknown {
  const path = url.split('?')[0]
  const table: Record<string, unknown> = {
    '/api/me': me,
    '/api/projects': { items: [project] },
    '/api/projects/7': {
      ...project,
      members: [
        {
          userId: 5,
          email: 'o@lab.example',
          name: 'An Owner',
          role: 'owner',
          joinedAt: project.createdAt,
        },
      ],
    },
    '/api/datasets': { items: [dataset], total: 1 },
    '/api/datasets/STPL-000001': shown,
    '/api/datasets/1/shares': { items: [] },
    '/api/datasets/1/metadata': {
      metadata: { instrument: { objective: { lensNA: 1.49, immersion: 'Oil' } } },
      completeness: computeCompleteness(
        { instrument: { objective: { lensNA: 1.49, immersion: 'Oil' } } },
        shown,
      ),
    },
    '/api/projects/7/suggestions': { 'biosample.structure': ['nuclear pore complex'] },
    '/api/me/tokens': {
      items: [
        {
          id: 3,
          name: 'Workstation',
          prefix: 'stp_ab12',
          createdAt: project.createdAt,
          lastUsedAt: null,
          expiresAt: null,
        },
      ],
    },
    '/api/dev/mail': {
      items: [
        {
          id: 1,
          to: ['o@lab.example'],
          from: 'stipple@hub.example',
          subject: 'Submitted for curation',
          text: 'Hello',
          receivedAt: project.createdAt,
        },
      ],
    },
    '/api/audit': { items: [], total: 0 },
    '/api/users': {
      items: [
        {
          id: 12,
          name: 'Former Colleague',
          email: 'former@lab.example',
          siteRole: null,
          organization: 'Pore lab',
          lastSignInAt: project.createdAt,
          deactivatedAt: project.createdAt,
          createdAt: project.createdAt,
        },
      ],
      total: 1,
    },
  }
  return path && path in table
    ? table[path]
    : { type: 'about:blank', title: 'Not Found', status: 404 }
}

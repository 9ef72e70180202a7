import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import {
  addMemberSchema,
  createProjectSchema,
  memberSchema,
  projectDetailSchema,
  projectSchema,
} from '@shared/schemas/project.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

export function registerProjectPaths(registry: OpenAPIRegistry) {
  const tags = ['Projects']
  const params = z.object({ id: z.number().int() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/projects',
    summary: 'Projects I can see',
    tags,
    response: listOf(projectSchema),
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/projects',
    summary: 'Create a project (you become its owner)',
    tags,
    body: createProjectSchema,
    response: projectSchema,
    status: 201,
    errors: [400, 401, 403, 409],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/projects/{id}',
    summary: 'A project with its members',
    tags,
    params,
    response: projectDetailSchema,
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/projects/{id}/members',
    summary: 'Members of a project',
    tags,
    params,
    response: listOf(memberSchema),
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/projects/{id}/members',
    summary: 'Add a member or change their role (owners only); invites unknown addresses by e-mail',
    tags,
    params,
    body: addMemberSchema,
    response: memberSchema,
    status: 201,
    errors: [400, 401, 403, 404, 409],
  })
}

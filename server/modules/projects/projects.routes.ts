import { Router } from 'express'
import { z } from 'zod'
import { idSchema } from '@shared/schemas/common.schema'
import { addMemberSchema, createProjectSchema } from '@shared/schemas/project.schema'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import type { AppDeps } from '../../services'
import {
  addMember,
  createProject,
  getProject,
  listMembers,
  listProjects,
  projectFor,
} from './projects.service'

const projectParams = z.object({ id: idSchema })

export function projectsRouter(deps: AppDeps): Router {
  const router = Router()

  router.get('/', async (req, res) => {
    res.json({ items: await listProjects(em(), req) })
  })

  router.post('/', requireUser, async (req, res) => {
    const project = await createProject(em(), req, parseBody(createProjectSchema, req))
    res.status(201).location(`/api/projects/${project.id}`).json(project)
  })

  router.get('/:id', async (req, res) => {
    res.json(await getProject(em(), req, parseParams(projectParams, req).id))
  })

  router.get('/:id/members', async (req, res) => {
    const project = await projectFor(em(), req, parseParams(projectParams, req).id, 'read')
    res.json({ items: await listMembers(em(), project.id) })
  })

  router.post('/:id/members', requireUser, async (req, res) => {
    const project = await projectFor(
      em(),
      req,
      parseParams(projectParams, req).id,
      'manage_members',
    )
    const { member, created } = await addMember(
      em(),
      req,
      deps,
      project,
      parseBody(addMemberSchema, req),
    )
    res.status(created ? 201 : 200).json(member)
  })

  return router
}

import type {
  AddMemberInput,
  CreateProjectInput,
  MemberDto,
  ProjectDetailDto,
  ProjectDto,
} from '@shared/schemas/project.schema'
import { api } from './client'

export const listProjects = () => api.get<{ items: ProjectDto[] }>('/api/projects')
export const getProject = (id: number) => api.get<ProjectDetailDto>(`/api/projects/${id}`)
export const createProject = (body: CreateProjectInput) =>
  api.post<ProjectDto>('/api/projects', body)
export const addMember = (projectId: number, body: AddMemberInput) =>
  api.post<MemberDto>(`/api/projects/${projectId}/members`, body)

import type { InstrumentMetadata } from '@shared/metadata/instrument.schema'
import { api } from './client'

/** A lab's saved description of one of its instruments. */
export interface InstrumentProfileDto {
  id: number
  name: string
  instrument: InstrumentMetadata
  createdAt: string
}

export const listInstrumentProfiles = () =>
  api.get<{ items: InstrumentProfileDto[] }>('/api/instrument-profiles')
export const createInstrumentProfile = (body: { name: string; instrument: InstrumentMetadata }) =>
  api.post<InstrumentProfileDto>('/api/instrument-profiles', body)
export const deleteInstrumentProfile = (id: number) => api.delete(`/api/instrument-profiles/${id}`)

import { defineStore } from 'pinia'
import { ref, shallowRef } from 'vue'
import type {
  CreateDatasetInput,
  DatasetDto,
  ReviewDatasetInput,
  SetEmbargoInput,
  UpdateDatasetInput,
} from '@shared/schemas/dataset.schema'
import { ApiError, errorMessage } from '@/api/client'
import * as datasets from '@/api/datasets'

/** The dataset open on screen, and the actions that change it (each leaves it up to date). */
export const useDatasetsStore = defineStore('datasets', () => {
  const current = shallowRef<DatasetDto | null>(null)
  const loading = ref(false)
  const error = ref<string | null>(null)
  /** The HTTP status of the failed load (0 without an answer): 404 and 403 mean "not found". */
  const errorStatus = ref<number | null>(null)
  let wanted = ''

  async function open(idOrAccession: string): Promise<void> {
    wanted = idOrAccession
    if (!showing(wanted)) current.value = null
    loading.value = true
    error.value = null
    errorStatus.value = null
    try {
      const dto = await datasets.getDataset(idOrAccession)
      if (wanted === idOrAccession) current.value = dto
    } catch (e) {
      if (wanted === idOrAccession) {
        error.value = errorMessage(e)
        errorStatus.value = e instanceof ApiError ? e.status : null
      }
    } finally {
      if (wanted === idOrAccession) loading.value = false
    }
  }

  /** The open dataset if it is the one asked for (by id or accession), else null. */
  const showing = (idOrAccession: string): DatasetDto | null => {
    const d = current.value
    return d && (d.accession === idOrAccession || String(d.id) === idOrAccession) ? d : null
  }

  /** Every change answers with the whole dataset as the server now has it. */
  function settle(changed: DatasetDto): DatasetDto {
    current.value = changed
    return changed
  }

  const need = (): DatasetDto => {
    if (!current.value) throw new Error('No dataset is open')
    return current.value
  }

  const create = (body: CreateDatasetInput) => datasets.createDataset(body)
  const update = async (body: UpdateDatasetInput) =>
    settle(await datasets.updateDataset(need().id, body))
  const submit = async () => settle(await datasets.submitDataset(need().id))
  const review = async (body: ReviewDatasetInput) =>
    settle(await datasets.reviewDataset(need().id, body))
  const embargo = async (body: SetEmbargoInput) =>
    settle(await datasets.setEmbargo(need().id, body))

  async function remove(): Promise<void> {
    await datasets.deleteDataset(need().id)
    current.value = null
  }

  return {
    current,
    loading,
    error,
    errorStatus,
    showing,
    open,
    create,
    update,
    submit,
    review,
    embargo,
    remove,
  }
})

import { computed, ref, shallowRef, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { errorMessage } from '@/api/client'
import type { DatasetRef } from '@/api/quality'
import {
  createRegion,
  deleteRegion,
  editComment,
  listComments,
  listDatasetRegions,
  listFileRegions,
  patchRegion,
  postComment,
  setThreadResolved,
  type CommentDto,
  type RegionDto,
} from '@/api/regions'
import type { CreateRegionInput, PatchRegionInput } from '@shared/schemas/region.schema'
import { useDatasetEvents } from './useDatasetEvents'

/** Replaces the item with the same id, or appends it; lists stay in arrival order. */
function upsert<T extends { id: number }>(list: T[], item: T): T[] {
  const at = list.findIndex((x) => x.id === item.id)
  return at < 0 ? [...list, item] : list.map((x, i) => (i === at ? item : x))
}

export interface Thread {
  root: CommentDto
  replies: CommentDto[]
}

/**
 * The regions (of one table, or of the whole dataset) and the threads of a dataset, kept current
 * by the dataset's event stream, so what others draw and write appears without a reload.
 */
export function useDiscussion(
  datasetId: MaybeRefOrGetter<DatasetRef | null>,
  fileId: MaybeRefOrGetter<number | null> = null,
) {
  const regions = shallowRef<RegionDto[]>([])
  const comments = shallowRef<CommentDto[]>([])
  const loading = ref(false)
  const loaded = ref(false)
  const error = ref<string | null>(null)

  const belongsHere = (r: RegionDto) => {
    const file = toValue(fileId)
    return file === null || r.fileId === file
  }

  async function load() {
    const id = toValue(datasetId)
    if (id === null) return
    const file = toValue(fileId)
    loading.value = true
    error.value = null
    try {
      const [r, c] = await Promise.all([
        file === null ? listDatasetRegions(id) : listFileRegions(id, file),
        listComments(id),
      ])
      regions.value = r.items
      comments.value = c.items
      loaded.value = true
    } catch (e) {
      error.value = errorMessage(e)
    } finally {
      loading.value = false
    }
  }
  watch(() => [toValue(datasetId), toValue(fileId)], load, { immediate: true })

  const onComment = (data: unknown) => (comments.value = upsert(comments.value, data as CommentDto))
  const onRegion = (data: unknown) => {
    const region = data as RegionDto
    if (belongsHere(region)) regions.value = upsert(regions.value, region)
  }
  const { live } = useDatasetEvents(datasetId, {
    'comment.created': onComment,
    'comment.updated': onComment,
    'region.created': onRegion,
    'region.updated': onRegion,
    'region.deleted': (data) => {
      const { id } = data as { id: number }
      regions.value = regions.value.filter((r) => r.id !== id)
      comments.value = comments.value.filter((c) => c.regionId !== id)
    },
  })

  /** Threads by region (null: the dataset as a whole), oldest first. */
  const threads = computed(() => {
    const byRoot = new Map<number, Thread>()
    for (const c of comments.value)
      if (c.replyTo === null) byRoot.set(c.id, { root: c, replies: [] })
    for (const c of comments.value) if (c.replyTo !== null) byRoot.get(c.replyTo)?.replies.push(c)
    return [...byRoot.values()]
  })
  const threadsOf = (regionId: number | null) =>
    threads.value.filter((t) => t.root.regionId === regionId)
  const openThreads = computed(() => threads.value.filter((t) => t.root.resolvedAt === null))

  const id = () => {
    const value = toValue(datasetId)
    if (value === null) throw new Error('No dataset yet')
    return value
  }
  return {
    regions,
    comments,
    threads,
    threadsOf,
    openThreads,
    loading,
    loaded,
    error,
    live,
    load,
    async draw(file: number, input: CreateRegionInput) {
      const region = await createRegion(id(), file, input)
      regions.value = upsert(regions.value, region)
      return region
    },
    async change(regionId: number, input: PatchRegionInput) {
      regions.value = upsert(regions.value, await patchRegion(regionId, input))
    },
    async remove(regionId: number) {
      await deleteRegion(regionId)
      regions.value = regions.value.filter((r) => r.id !== regionId)
    },
    async say(body: string, regionId: number | null, replyTo: number | null = null) {
      onComment(await postComment(id(), { body, regionId, replyTo }))
    },
    async edit(commentId: number, body: string) {
      onComment(await editComment(commentId, body))
    },
    async resolve(rootId: number, resolved: boolean) {
      onComment(await setThreadResolved(rootId, resolved))
    },
  }
}
export type Discussion = ReturnType<typeof useDiscussion>

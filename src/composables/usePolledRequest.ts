import { onScopeDispose, ref, shallowRef } from 'vue'

export interface PolledRequestOptions<T> {
  /** Pause between answers while `again` holds, ms. */
  everyMs: number
  /** Whether to ask again after this answer (`failed` when the last request threw). */
  again: (latest: T | null, failed: boolean) => boolean
}

/**
 * One GET kept fresh while the server is still working: `reload()` asks now (an answer to an
 * older request that arrives late is dropped), then again after `everyMs` while `again` holds.
 * `load` returning null means there is nothing to ask for yet. Stops when the scope goes.
 */
export function usePolledRequest<T>(
  load: () => Promise<T> | null,
  options: PolledRequestOptions<T>,
) {
  const data = shallowRef<T | null>(null)
  /** The last request's failure as thrown (an ApiError carries the status). */
  const error = shallowRef<unknown>(null)
  const loading = ref(false)
  let timer: ReturnType<typeof setTimeout> | null = null
  let latest = 0

  function stop() {
    if (timer !== null) clearTimeout(timer)
    timer = null
  }

  async function reload(): Promise<void> {
    stop()
    const request = load()
    if (!request) return
    const mine = ++latest
    loading.value = true
    try {
      const next = await request
      if (mine !== latest) return
      data.value = next
      error.value = null
    } catch (e) {
      if (mine === latest) error.value = e
    } finally {
      if (mine === latest) loading.value = false
    }
    if (mine === latest && options.again(data.value, error.value !== null))
      timer = setTimeout(() => void reload(), options.everyMs)
  }

  /** Forget the answer (another subject is shown) and drop any request in flight. */
  function clear() {
    latest++
    stop()
    data.value = null
    error.value = null
    loading.value = false
  }

  onScopeDispose(() => {
    latest++
    stop()
  })

  return { data, error, loading, reload, stop, clear }
}

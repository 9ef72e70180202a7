import { ref, shallowRef, type Ref, type ShallowRef } from 'vue'
import { errorMessage } from '@/api/client'

export interface AsyncState<T, A extends unknown[]> {
  data: ShallowRef<T | undefined>
  loading: Ref<boolean>
  /** The error's words, ready to show; null when the last run succeeded. */
  error: Ref<string | null>
  run: (...args: A) => Promise<T | undefined>
}

/**
 * Loading and error state around one async call. Only the latest run may set the result, so a
 * slow earlier answer never overwrites a newer one.
 */
export function useAsync<T, A extends unknown[] = []>(
  fn: (...args: A) => Promise<T>,
): AsyncState<T, A> {
  const data = shallowRef<T>()
  const loading = ref(false)
  const error = ref<string | null>(null)
  let latest = 0

  async function run(...args: A): Promise<T | undefined> {
    const mine = ++latest
    loading.value = true
    error.value = null
    try {
      const result = await fn(...args)
      if (mine === latest) data.value = result
      return result
    } catch (e) {
      if (mine === latest) error.value = errorMessage(e)
      return undefined
    } finally {
      if (mine === latest) loading.value = false
    }
  }

  return { data, loading, error, run }
}

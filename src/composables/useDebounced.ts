import { onScopeDispose, shallowRef, watch, type Ref } from 'vue'

/** A copy of `source` that follows it only after it has stayed unchanged for `ms`. */
export function useDebounced<T>(source: Ref<T>, ms = 300): Ref<T> {
  const out = shallowRef(source.value)
  let timer: ReturnType<typeof setTimeout> | undefined
  watch(source, (value) => {
    clearTimeout(timer)
    timer = setTimeout(() => (out.value = value), ms)
  })
  onScopeDispose(() => clearTimeout(timer))
  return out
}

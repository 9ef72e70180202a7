import { onScopeDispose, ref, watch, type Ref } from 'vue'

/** A copy of `source` that follows it only after it has stayed unchanged for `ms`. */
export function useDebounced<T>(source: Ref<T>, ms = 300): Ref<T> {
  const out = ref(source.value) as Ref<T>
  let timer: ReturnType<typeof setTimeout> | undefined
  watch(source, (value) => {
    clearTimeout(timer)
    timer = setTimeout(() => (out.value = value), ms)
  })
  onScopeDispose(() => clearTimeout(timer))
  return out
}

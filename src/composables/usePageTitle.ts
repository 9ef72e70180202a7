import { toValue, watch, type MaybeRefOrGetter } from 'vue'

/** Names the browser tab after what the page shows, once it is known. */
export function usePageTitle(title: MaybeRefOrGetter<string | null | undefined>): void {
  watch(
    () => toValue(title),
    (value) => {
      if (value) document.title = `${value} · Stipple`
    },
    { immediate: true },
  )
}

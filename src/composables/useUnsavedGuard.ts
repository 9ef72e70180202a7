import { onBeforeUnmount, onMounted, type Ref } from 'vue'
import { onBeforeRouteLeave } from 'vue-router'

/**
 * Keeps unsaved typing from being lost on the way out: leaving the page saves first, and asks
 * before going when that did not work; closing the tab asks the browser's own question.
 */
export function useUnsavedGuard(unsaved: Ref<boolean>, flush: () => Promise<void>) {
  onBeforeRouteLeave(async () => {
    if (!unsaved.value) return true
    await flush()
    return !unsaved.value || window.confirm('Some changes are not saved. Leave this page anyway?')
  })
  const warn = (event: BeforeUnloadEvent) => {
    if (unsaved.value) event.preventDefault()
  }
  onMounted(() => window.addEventListener('beforeunload', warn))
  onBeforeUnmount(() => window.removeEventListener('beforeunload', warn))
}

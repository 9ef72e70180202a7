import { defineStore } from 'pinia'
import { computed, markRaw, ref, shallowRef } from 'vue'
import type { MeDto } from '@shared/schemas/user.schema'
import { errorMessage } from '@/api/client'
import { fetchMe } from '@/api/me'
import { ability, updateAbility } from '@/plugins/casl'

/** Who is signed in, and what they may do. Loaded once when the app starts. */
export const useSessionStore = defineStore('session', () => {
  const me = shallowRef<MeDto | null>(null)
  const error = ref<string | null>(null)
  let pending: Promise<void> | null = null

  const user = computed(() => me.value?.user ?? null)
  const signedIn = computed(() => user.value !== null)
  const demo = computed(() => me.value?.demo ?? false)
  const loaded = computed(() => me.value !== null)

  async function refresh(): Promise<void> {
    try {
      const answer = await fetchMe()
      me.value = answer
      error.value = null
      updateAbility(answer.viewer, answer.reviewing ?? [])
    } catch (e) {
      error.value = errorMessage(e)
      // Treat the person as signed out until the server answers; pages stay usable.
      updateAbility(null)
    }
  }

  /** The first call fetches; later calls share that answer (the router guard awaits it). */
  function load(): Promise<void> {
    pending ??= refresh()
    return pending
  }

  async function retry(): Promise<void> {
    pending = refresh()
    return pending
  }

  // Raw: the ability manages its own reactivity, and a Vue proxy around it would only slow it.
  return {
    me,
    user,
    signedIn,
    demo,
    loaded,
    error,
    ability: markRaw(ability),
    load,
    refresh,
    retry,
  }
})

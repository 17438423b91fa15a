import { defineStore } from 'pinia'
import type { Me } from '#shared/types/api'
import type { Action } from '#shared/types/policy'

/** The signed-in person, loaded once per visit and shared by the shell, the guard and every page. */
export const useSessionStore = defineStore('session', () => {
  const me = ref<Me | null>(null)
  /** True once /api/me has answered (with a person or with 401), so the guard asks only once. */
  const loaded = ref(false)

  /** What the server says this person may do in the program (a team action: in some team). */
  const can = computed(() => (action: Action): boolean => !!me.value?.can[action])

  /** Page access: pages name the action they are for; a page that names none is open to everyone signed in. */
  function mayOpen(action: Action | undefined): boolean {
    if (!me.value) return false
    return !action || can.value(action)
  }

  async function load(force = false): Promise<Me | null> {
    if (loaded.value && !force) return me.value
    // Taken before any await: on the server this forwards the visitor's cookie.
    const fetcher = useRequestFetch()
    try {
      me.value = await fetcher<Me>('/api/me')
    } catch (err) {
      if (statusOf(err) !== 401) throw err
      me.value = null
    }
    loaded.value = true
    return me.value
  }

  async function signOut(): Promise<void> {
    try {
      await $fetch('/api/auth/sign-out', { method: 'POST' })
    } finally {
      me.value = null
      loaded.value = true
    }
  }

  return { me, loaded, can, mayOpen, load, signOut }
})

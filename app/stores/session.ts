import { defineStore } from 'pinia'
import type { Me } from '#shared/types/api'
import type { Role } from '#shared/types/roles'

/** The signed-in person, loaded once per visit and shared by the shell, the guard and every page. */
export const useSessionStore = defineStore('session', () => {
  const me = ref<Me | null>(null)
  /** True once /api/me has answered (with a person or with 401), so the guard asks only once. */
  const loaded = ref(false)

  const isMentor = computed(() => !!me.value && (me.value.isMentor || me.value.roles.includes('mentor')))

  /** Whether the person holds this role anywhere in the program (literal: a mentor is not an operator unless made one). */
  const hasRole = computed(() => (role: Role): boolean => {
    if (!me.value) return false
    return role === 'mentor' ? isMentor.value : me.value.roles.includes(role)
  })

  /** Page access: a mentor may do everything; everyone else needs one of the listed roles. */
  function mayOpen(roles: readonly Role[] | undefined): boolean {
    if (!me.value) return false
    if (!roles || roles.length === 0 || isMentor.value) return true
    return roles.some((r) => hasRole.value(r))
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

  return { me, loaded, isMentor, hasRole, mayOpen, load, signOut }
})

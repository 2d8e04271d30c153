import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import { authApi } from '../api/auth'
import { ApiProblem } from '../api/http'
import type { Me, Role } from '../api/types'

/** Who is signed in and their role in each project. `loaded` tells "not yet asked" from "signed out". */
export const useSessionStore = defineStore('session', () => {
  const me = ref<Me | null>(null)
  const loaded = ref(false)
  let pending: Promise<Me | null> | null = null

  const signedIn = computed(() => me.value !== null)
  const isSiteAdmin = computed(() => me.value?.isSiteAdmin === true)

  /** Ask the server once (or again with force); 401 means signed out, not an error. */
  function load(force = false): Promise<Me | null> {
    if (loaded.value && !force) return Promise.resolve(me.value)
    pending ??= authApi.me()
      .then((m) => { me.value = m; return m })
      .catch((e) => {
        if (e instanceof ApiProblem && e.status === 401) { me.value = null; return null }
        throw e
      })
      .finally(() => { loaded.value = true; pending = null })
    return pending
  }

  async function signIn(email: string, password: string) {
    await authApi.signIn(email, password)
    await load(true)
  }

  /**
   * Signs up, then in: sign-up answers alike for a taken address (whose owner is mailed instead),
   * so a failing sign-in here means "look in your mailbox", not an error.
   */
  async function signUp(body: { email: string; password: string; name: string }): Promise<'signed-in' | 'check-mail'> {
    await authApi.signUp(body)
    try {
      await authApi.signIn(body.email, body.password)
    } catch (e) {
      if (e instanceof ApiProblem && e.status === 401) return 'check-mail'
      throw e
    }
    await load(true)
    return 'signed-in'
  }

  async function signOut() {
    try { await authApi.signOut() } finally { me.value = null; loaded.value = true }
  }

  function roleIn(projectId: string): Role | null {
    return me.value?.projects.find((p) => p.id === projectId)?.role ?? null
  }

  return { me, loaded, signedIn, isSiteAdmin, load, signIn, signUp, signOut, roleIn }
})

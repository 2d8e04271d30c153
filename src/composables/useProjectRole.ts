import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import type { Role } from '../api/types'
import { useProjectsStore } from '../stores/projects'
import { useSessionStore } from '../stores/session'

/**
 * What the signed-in user may do in a project. The server refuses anyway; the dashboard hides the
 * controls so a viewer never meets a button that can only fail.
 */
export function useProjectRole(projectId: MaybeRefOrGetter<string>) {
  const session = useSessionStore()
  const projects = useProjectsStore()
  const role = computed<Role | null>(() => {
    const id = toValue(projectId)
    return session.roleIn(id) ?? projects.byId(id)?.role ?? null
  })
  return {
    role,
    isOwner: computed(() => role.value === 'owner'),
    canEdit: computed(() => role.value === 'owner' || role.value === 'analyst'),
  }
}

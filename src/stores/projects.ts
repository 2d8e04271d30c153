import { defineStore } from 'pinia'
import { ref } from 'vue'
import { ApiProblem } from '../api/http'
import { projectsApi } from '../api/projects'
import type { Project } from '../api/types'

export const useProjectsStore = defineStore('projects', () => {
  const items = ref<Project[]>([])
  const loading = ref(false)
  const problem = ref<ApiProblem>()
  const loaded = ref(false)

  async function load() {
    loading.value = true
    try { items.value = (await projectsApi.list()).items; problem.value = undefined; loaded.value = true }
    catch (e) { if (e instanceof ApiProblem) problem.value = e; else throw e }
    finally { loading.value = false }
  }

  async function create(name: string, description?: string): Promise<Project> {
    const project = await projectsApi.create({ name, description: description || undefined })
    items.value = [...items.value, project]
    return project
  }

  function byId(id: string): Project | undefined {
    return items.value.find((p) => p.id === id)
  }

  const inflight = new Map<string, Promise<Project>>()
  /**
   * Fetch one project (the router starts this on entry, the shell waits for it) and keep the list
   * in step; concurrent calls for the same project share one request.
   */
  function fetchOne(id: string): Promise<Project> {
    const pending = inflight.get(id)
    if (pending) return pending
    const request = projectsApi.get(id).then((project) => {
      const i = items.value.findIndex((p) => p.id === id)
      if (i >= 0) items.value.splice(i, 1, project)
      else items.value.push(project)
      return project
    }).finally(() => inflight.delete(id))
    inflight.set(id, request)
    return request
  }

  return { items, loading, problem, loaded, load, create, byId, fetchOne }
})

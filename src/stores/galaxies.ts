import { defineStore } from 'pinia'
import { ref } from 'vue'
import { galaxiesApi } from '../api/galaxies'
import { ApiProblem } from '../api/http'
import type { GalaxyPage, GalaxyQuery } from '../api/types'

/** One page of a project's galaxies; keeps the last good page on failure. */
export const useGalaxiesStore = defineStore('galaxies', () => {
  const page = ref<GalaxyPage>()
  const problem = ref<ApiProblem>()
  const loading = ref(false)
  let controller: AbortController | null = null

  async function load(projectId: string, query: GalaxyQuery) {
    // a newer request (the user clicked on) makes the older answer irrelevant
    controller?.abort()
    controller = new AbortController()
    const signal = controller.signal
    loading.value = true
    try { page.value = await galaxiesApi.list(projectId, query, signal); problem.value = undefined }
    catch (e) {
      if (e instanceof DOMException && e.name === 'AbortError') return
      if (e instanceof ApiProblem) problem.value = e; else throw e
    }
    finally { if (!signal.aborted) loading.value = false }
  }
  return { page, problem, loading, load }
})

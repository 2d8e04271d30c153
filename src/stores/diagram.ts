import { defineStore } from 'pinia'
import { computed, ref, shallowRef } from 'vue'
import { galaxiesApi } from '../api/galaxies'
import { ApiProblem } from '../api/http'
import { projectsApi } from '../api/projects'
import type { DiagramColumns, DiagramKey, GalaxyFilters, Settings } from '../api/types'
import { prepareDiagramArrays, type DiagramArrays } from '../components/diagrams/diagram-arrays'

export type ColourBy = 'overall' | 'own'

/**
 * The sample on the diagrams and the linked selection. Columns are kept in shallow refs: 100 000
 * galaxies in deep-reactive arrays would make every read go through a proxy.
 */
export const useDiagramStore = defineStore('diagram', () => {
  const projectId = ref<string | null>(null)
  const columns = shallowRef<DiagramColumns | null>(null)
  const arrays = shallowRef<DiagramArrays | null>(null)
  const loading = ref(false)
  const problem = ref<ApiProblem | null>(null)
  const filters = ref<GalaxyFilters>({})
  /** indices into the columns; null means nothing is selected */
  const selection = shallowRef<number[] | null>(null)
  /** the panel the selection was drawn in, so the others can drop their own outline */
  const selectionSource = ref<DiagramKey | null>(null)
  const colourBy = ref<ColourBy>('overall')
  const showErrors = ref(false)
  const showReddening = ref(true)
  /** the project's current assumptions: the reddening arrow follows its extinction law and R_V */
  const settings = ref<Settings | null>(null)
  let controller: AbortController | null = null

  const selectionCount = computed(() => selection.value?.length ?? 0)

  async function load(id: string) {
    controller?.abort()
    controller = new AbortController()
    const signal = controller.signal
    if (projectId.value !== id || !settings.value) {
      projectsApi.assumptions(id).then((a) => { settings.value = a.current.settings }).catch(() => { settings.value = null })
    }
    projectId.value = id
    loading.value = true
    problem.value = null
    try {
      const cols = await galaxiesApi.diagram(id, filters.value, signal)
      columns.value = cols
      arrays.value = prepareDiagramArrays(cols)
      clearSelection()
    } catch (e) {
      if (e instanceof DOMException && e.name === 'AbortError') return
      if (e instanceof ApiProblem) problem.value = e
      else throw e
    } finally {
      if (!signal.aborted) loading.value = false
    }
  }

  function select(indices: number[] | null, source: DiagramKey | null = null) {
    selection.value = indices ? [...new Set(indices)].sort((a, b) => a - b) : null
    selectionSource.value = source
  }

  function clearSelection() {
    selection.value = null
    selectionSource.value = null
  }

  return {
    projectId, columns, arrays, loading, problem, filters, selection, selectionSource, selectionCount,
    colourBy, showErrors, showReddening, settings, load, select, clearSelection,
  }
})

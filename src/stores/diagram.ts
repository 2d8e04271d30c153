import { defineStore } from 'pinia'
import { computed, ref, shallowRef } from 'vue'
import { loadDiagramArrays } from '../api/diagram-columns'
import { ApiProblem } from '../api/http'
import { projectsApi } from '../api/projects'
import type { DiagramKey, GalaxyFilters, Settings } from '../api/types'
import type { DiagramArrays } from '../lib/diagrams/diagram-arrays'

export type ColourBy = 'overall' | 'own'

/**
 * The sample on the diagrams and the linked selection. Columns are kept in shallow refs: 100 000
 * galaxies in deep-reactive arrays would make every read go through a proxy.
 */
export const useDiagramStore = defineStore('diagram', () => {
  const projectId = ref<string | null>(null)
  const arrays = shallowRef<DiagramArrays | null>(null)
  const loading = ref(false)
  const problem = ref<ApiProblem | null>(null)
  const filters = ref<GalaxyFilters>({})
  /** indices into the arrays, ascending; null means nothing is selected */
  const selection = shallowRef<number[] | null>(null)
  /** the same selection as one byte per galaxy (1 = selected): what the panels draw from */
  const selectionMask = shallowRef<Uint8Array | null>(null)
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
      // marks let `npm run bench:ui` say where the time to a drawn page goes
      performance.mark('rg:diagram-request')
      // decoded on the main thread (no worker): the binary columns become typed-array views of the
      // response without parsing; only the JSON fallback is parsed
      arrays.value = await loadDiagramArrays(id, filters.value, signal)
      performance.mark('rg:diagram-received')
      clearSelection()
    } catch (e) {
      if (e instanceof DOMException && e.name === 'AbortError') return
      if (e instanceof ApiProblem) problem.value = e
      else throw e
    } finally {
      if (!signal.aborted) loading.value = false
    }
  }

  /** A load the router started for the screen about to mount, which the screen then takes over. */
  let prefetched: string | null = null

  function start(id: string) {
    // a different project must not inherit the previous one's filters or selection
    if (projectId.value !== id) { filters.value = {}; arrays.value = null; settings.value = null; clearSelection() }
    void load(id)
  }

  /**
   * Called by the router as soon as the Diagrams route is chosen, so the columns download while the
   * screen's code and plotly load. Every navigation loads afresh (a 304 when nothing changed).
   */
  function prefetch(id: string) {
    prefetched = id
    start(id)
  }

  /** Called by the screen on mount: takes over the router's load, or starts one. */
  function enter(id: string) {
    if (prefetched === id) { prefetched = null; return }
    prefetched = null
    start(id)
  }

  function select(indices: number[] | null, source: DiagramKey | null = null) {
    if (!indices) return clearSelection()
    performance.mark('rg:select')
    const mask = new Uint8Array(arrays.value?.count ?? 0)
    for (const i of indices) if (i >= 0 && i < mask.length) mask[i] = 1
    // the mask also de-duplicates and orders the indices
    const sorted: number[] = []
    for (let i = 0; i < mask.length; i++) if (mask[i]) sorted.push(i)
    selectionSource.value = source
    selectionMask.value = mask
    selection.value = sorted
  }

  function clearSelection() {
    selection.value = null
    selectionMask.value = null
    selectionSource.value = null
  }

  return {
    projectId, arrays, loading, problem, filters, selection, selectionMask, selectionSource, selectionCount,
    colourBy, showErrors, showReddening, settings, load, prefetch, enter, select, clearSelection,
  }
})

import type { GalaxySummary } from '../../api/types'
import { LIST_ORDER, resultField } from '../../../shared/results/registry.ts'
import { at } from '../../../shared/results/values.ts'

/** The columns a galaxies table can show; `sort` names the server's sort field where there is one. */
export interface GalaxyColumn {
  key: string
  title: string
  sort?: string
  numeric?: boolean
  digits?: number
  /** fixed decimals even for tiny values (logarithms) */
  fixed?: boolean
  value: (g: GalaxySummary) => unknown
  kind?: 'class' | 'id'
  /** the registry key of this value's 1σ error, shown beside it */
  error?: string
  /** that error in a list item */
  errorValue?: (g: GalaxySummary) => unknown
  defaultOn?: boolean
}

const errorAt = (path: readonly string[]) => (g: GalaxySummary) => at(g, path)

/** The registry's fields with a table column (shared/results/registry.ts), in list order. */
export const GALAXY_COLUMNS: GalaxyColumn[] = LIST_ORDER.filter((f) => f.table && f.list).map((f) => {
  const t = f.table!
  const path = f.list!
  const numeric = f.kind === 'number' || f.kind === 'flags'
  return {
    key: t.key ?? f.key, title: t.label, value: (g: GalaxySummary) => at(g, path),
    ...(f.sort ? { sort: f.key } : {}),
    ...(numeric ? { numeric: true } : {}),
    ...(t.digits !== undefined ? { digits: t.digits } : {}),
    ...(t.fixed ? { fixed: true } : {}),
    ...(f.kind === 'class' ? { kind: 'class' as const } : f.key === 'id' ? { kind: 'id' as const } : {}),
    ...(t.error ? { error: t.error, errorValue: errorAt(resultField(t.error).list!) } : {}),
    ...(t.defaultOn ? { defaultOn: true } : {}),
  }
})

export const DEFAULT_COLUMNS = GALAXY_COLUMNS.filter((c) => c.defaultOn).map((c) => c.key)

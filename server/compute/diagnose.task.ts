// The work a compute thread does (server/compute/worker.mjs loads this file). Pure: the same
// function runs in-process when no pool is given, so both paths give identical answers.
import type { GalaxyInputDto, Settings } from '../../shared/schemas/galaxy.schema.ts'
import { diagnoseMany, ScienceInputError, type GalaxyInput, type GalaxyResult } from '../../shared/science.ts'
import { runChain } from '../../shared/diagnostics/pipeline.ts'
import { ScienceSettingsError } from '../../shared/diagnostics/settings.ts'
import { encodeStoredRows } from '../services/result-copy.ts'

/**
 * What a chunk returns:
 * - `objects`: the results (structured-cloned back);
 * - `json`: the results as UTF-8 JSON array members without the brackets, ready to be sent;
 * - `stored`: the binary COPY fields of each galaxy's `results` row (server/services/result-copy.ts),
 *   without the galaxy id and the constants, which the caller puts in front; no document is built.
 */
export type OutputMode = 'objects' | 'json' | 'stored'

export interface DiagnoseTask {
  mode: OutputMode
  galaxies: GalaxyInputDto[]
  settings: Settings
}

/** A science error with the galaxy's index inside the chunk, so the caller can name the field. */
export type TaskFailure =
  | { failed: 'input'; index: number; rest: string; message: string }
  | { failed: 'settings'; path: string; message: string }

export type TaskOutput = GalaxyResult[] | Uint8Array

export function isFailure(v: unknown): v is TaskFailure {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && !(v instanceof Uint8Array) && 'failed' in v
}

export function diagnoseTask(task: DiagnoseTask): TaskOutput | TaskFailure {
  let results: GalaxyResult[] = []
  let stored: Uint8Array | undefined
  try {
    if (task.mode === 'stored') stored = encodeStoredRows(runChain(task.galaxies as GalaxyInput[], task.settings), task.galaxies, task.settings)
    else results = diagnoseMany(task.galaxies as GalaxyInput[], task.settings)
  } catch (err) {
    if (err instanceof ScienceInputError) {
      // diagnoseMany's path starts with the galaxy's index: /3/lines/hbeta/error
      const m = /^\/(\d+)(.*)$/.exec(err.path)
      if (m) return { failed: 'input', index: Number(m[1]), rest: m[2], message: err.message }
      return { failed: 'input', index: -1, rest: err.path, message: err.message }
    }
    if (err instanceof ScienceSettingsError) return { failed: 'settings', path: err.path, message: err.message }
    if (err instanceof RangeError) return { failed: 'settings', path: '/settings', message: err.message }
    throw err
  }
  if (stored) return stored
  if (task.mode === 'objects') return results
  // an own ArrayBuffer (not Node's shared Buffer pool), so it can be transferred instead of copied
  const json = new TextEncoder().encode(JSON.stringify(results))
  return json.subarray(1, json.length - 1)
}

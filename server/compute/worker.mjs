// Entry of a compute thread. Worker threads start plain Node (the pool passes no execArgv), so this
// registers tsx's loader before importing the TypeScript tasks; the same works under `tsx` and vitest.
import { register } from 'tsx/esm/api'
import { move } from 'piscina'

register()
const { diagnoseTask } = await import('./diagnose.task.ts')
const { encodeDiagramTask } = await import('./diagram.task.ts')
const { parseBodyTask } = await import('./parse-body.task.ts')
const { readSpectraTask } = await import('./read-spectra.task.ts')
const { fitSpectrumTask } = await import('./fit-spectra.task.ts')

const TASKS = { diagram: encodeDiagramTask, 'parse-body': parseBodyTask, 'read-spectra': readSpectraTask, 'fit-spectrum': fitSpectrumTask }

export default function run(task) {
  const out = (TASKS[task.kind] ?? diagnoseTask)(task)
  // bytes are handed over, not copied
  return out instanceof Uint8Array ? move(out) : out
}

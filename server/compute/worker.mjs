// Entry of a compute thread. Worker threads start plain Node (the pool passes no execArgv), so this
// registers tsx's loader before importing the TypeScript tasks; the same works under `tsx` and vitest.
import { register } from 'tsx/esm/api'
import { move } from 'piscina'

register()
const { diagnoseTask } = await import('./diagnose.task.ts')
const { encodeDiagramTask } = await import('./diagram.task.ts')
const { parseBodyTask } = await import('./parse-body.task.ts')

export default function run(task) {
  const out = task.kind === 'diagram' ? encodeDiagramTask(task) : task.kind === 'parse-body' ? parseBodyTask(task) : diagnoseTask(task)
  // bytes are handed over, not copied
  return out instanceof Uint8Array ? move(out) : out
}

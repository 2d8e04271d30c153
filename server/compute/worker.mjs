// Entry of a compute thread. Worker threads start plain Node (the pool passes no execArgv), so this
// registers tsx's loader before importing the TypeScript task; the same works under `tsx` and vitest.
import { register } from 'tsx/esm/api'
import { move } from 'piscina'

register()
const { diagnoseTask } = await import('./diagnose.task.ts')

export default function run(task) {
  const out = diagnoseTask(task)
  // JSON bytes are handed over, not copied
  return out instanceof Uint8Array ? move(out) : out
}

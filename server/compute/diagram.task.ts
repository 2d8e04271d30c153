// The binary form of a diagram document (shared/diagram-columns.ts), made on a compute thread:
// parsing the JSON of 10⁵ galaxies and packing its columns costs the event loop ≈ 0.1–0.3 s.
import { encodeDiagramColumns, typedColumns, type DiagramColumnsJson } from '../../shared/diagram-columns.ts'

export interface DiagramTask { kind: 'diagram'; json: Uint8Array }

export function encodeDiagramTask(task: DiagramTask): Uint8Array {
  return encodeDiagramColumns(typedColumns(JSON.parse(new TextDecoder().decode(task.json)) as DiagramColumnsJson))
}

import type { IntakeCounts } from '../../shared/schemas/intake.schema.ts'

/** The counts of an intake before its first chunk is written. */
export const zeroCounts = (): IntakeCounts => ({ inserted: 0, updated: 0, replaced: 0, merged: 0, skipped: 0 })

/** Adds a chunk's counts into an intake's (one intake is written in chunks). */
export function addCounts(total: IntakeCounts, chunk: IntakeCounts): void {
  for (const k of Object.keys(total) as Array<keyof IntakeCounts>) total[k] += chunk[k]
}

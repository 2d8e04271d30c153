import { readFileSync, writeFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../helpers/app.ts'
import { demoDigest, type DemoDigest } from '../helpers/demo-digest.ts'

// The demo project's numbers are those of the version before results were stored as typed columns:
// tests/fixtures/demo-digest.json was written by this file with WRITE_DEMO_DIGEST=<file> on that
// version (main at 8282290, where each result was a JSON document). Numbers agree to the precision
// of their storage: a real keeps 24 bits (≈ 6·10⁻⁸), the CSV writes 6 significant digits (≤ 5·10⁻⁶).

const FIXTURE = new URL('../fixtures/demo-digest.json', import.meta.url)
const CSV_WITHIN = 1e-5
const PAGE_WITHIN = 1e-6

let t: TestApp
let now: DemoDigest
beforeAll(async () => {
  t = await startTestApp({}, { jobs: true })
  now = await demoDigest(t)
  if (process.env.WRITE_DEMO_DIGEST) writeFileSync(process.env.WRITE_DEMO_DIGEST, JSON.stringify(now) + '\n')
}, 300_000)
afterAll(async () => { await t?.close() })

const close = (a: number, b: number, within: number) => a === b || Math.abs(a - b) <= within * Math.max(Math.abs(a), Math.abs(b))

/** Paths at which two values differ (numbers beyond `within`, anything else by equality). */
function differences(a: unknown, b: unknown, within: number, path = ''): string[] {
  if (typeof a === 'number' && typeof b === 'number') return close(a, b, within) ? [] : [`${path}: ${a} vs ${b}`]
  if (typeof a === 'string' && typeof b === 'string' && a !== '' && b !== '' && Number.isFinite(Number(a)) && Number.isFinite(Number(b)))
    return close(Number(a), Number(b), within) ? [] : [`${path}: ${a} vs ${b}`]
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return a === b ? [] : [`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`]
  const keys = new Set([...Object.keys(a), ...Object.keys(b)])
  return [...keys].flatMap((k) => differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], within, `${path}/${k}`))
}

describe('the demo project against the version before typed result columns', () => {
  const before = JSON.parse(readFileSync(FIXTURE, 'utf8')) as DemoDigest

  it('ingests the same galaxies and recomputes the same revision', () => {
    expect(now.galaxies).toBe(2400)
    expect(now.galaxies).toBe(before.galaxies)
    expect(now.revisions.map((r) => r.revision)).toEqual(before.revisions.map((r) => r.revision))
  })

  for (const [i, label] of [[0, 'ingested (revision 1)'], [1, 'recomputed (revision 2, Monte Carlo)']] as const) {
    it(`${label}: the CSV export has the same columns, the same classes and flags, and the same numbers`, () => {
      const a = now.revisions[i], b = before.revisions[i]
      expect(a.header).toEqual(b.header)
      expect(differences(a.columns, b.columns, CSV_WITHIN)).toEqual([])
      expect(a.rows).toHaveLength(100)
      expect(differences(a.rows, b.rows, CSV_WITHIN)).toEqual([])
    })
    it(`${label}: the galaxy pages serve the same results`, () => {
      const a = now.revisions[i], b = before.revisions[i]
      expect(Object.keys(a.pages)).toHaveLength(6)
      expect(differences(a.pages, b.pages, PAGE_WITHIN)).toEqual([])
    })
  }
})

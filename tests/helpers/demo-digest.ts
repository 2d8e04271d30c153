import request from 'supertest'
import { parse } from 'csv-parse/sync'
import { DEMO_ACCOUNTS } from '../../server/seed/demo-accounts.ts'
import { DEMO_PROJECT_NAME, seedDemo } from '../../server/seed/demo.ts'
import type { TestApp } from './app.ts'

// What the demo project's numbers look like from outside, through the HTTP API only, so the same
// function runs on any version of the product: the seeded galaxies (the ingestion path), a recompute
// under changed assumptions (the jobs path) and the CSV export and galaxy pages of both revisions.
// tests/fixtures/demo-digest.json holds its output on the version before results became typed
// columns; tests/api/demo-digest.test.ts compares today's output with it.

/** Per export column: how many galaxies have a value, the sum of |value| (numbers) or the value counts (text). */
export type ColumnDigest = { filled: number; sumAbs?: number; values?: Record<string, number> }
export interface RevisionDigest {
  revision: number
  header: string[]
  /** every 24th galaxy's export row, whole (cells in the header's order) */
  rows: string[][]
  columns: Record<string, ColumnDigest>
  /** the results of a few galaxies as their pages read them (the API's document of the revision) */
  pages: Record<string, unknown>
}
export interface DemoDigest { galaxies: number; revisions: RevisionDigest[] }

const PAGE_KEYS = 6
/** the second revision: other dust assumptions, another SFR calibration, and Monte Carlo draws (stored as percentiles) */
const REVISION_2 = { intrinsicBalmer: 3.1, rv: 3.5, sfrCalibration: 'kennicuttEvans12', monteCarlo: { draws: 100, seed: 7 } }
const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))

export async function demoDigest(t: TestApp): Promise<DemoDigest> {
  await seedDemo(t.db, () => {}, { spectra: false })
  const owner = DEMO_ACCOUNTS.find((a) => a.role === 'owner')!
  const agent = request.agent(t.app)
  const signIn = await agent.post('/api/v1/auth/sign-in').send({ email: owner.email, password: owner.password })
  if (signIn.status !== 200) throw new Error(`sign-in failed: ${signIn.status}`)
  const cookies = ([] as string[]).concat(signIn.headers['set-cookie'] ?? [])
  const csrf = decodeURIComponent(/rg_csrf=([^;]+)/.exec(cookies.join(';'))?.[1] ?? '')
  const projects = (await agent.get('/api/v1/projects')).body
  const project = (projects.projects ?? projects.items ?? projects).find((p: { name: string }) => p.name === DEMO_PROJECT_NAME)
  const P = `/api/v1/projects/${project.id}`
  const revisions: RevisionDigest[] = []
  const digest = async (revision: number) => {
    const csv = await agent.get(`${P}/exports/galaxies.csv`).buffer(true)
      .parse((r, cb) => { let s = ''; r.setEncoding('utf8'); r.on('data', (c: string) => { s += c }); r.on('end', () => cb(null, s)) })
    if (csv.status !== 200) throw new Error(`export failed: ${csv.status}`)
    const records = parse(csv.body as string, { columns: true, skip_empty_lines: true, comment: '#', comment_no_infix: true }) as Record<string, string>[]
    const header = Object.keys(records[0])
    const columns: Record<string, ColumnDigest> = {}
    for (const h of header) {
      const d: ColumnDigest = { filled: 0 }
      for (const r of records) {
        const v = r[h]
        if (v === '' || v === undefined) continue
        d.filled++
        const x = Number(v)
        if (Number.isFinite(x) && d.values === undefined) d.sumAbs = (d.sumAbs ?? 0) + Math.abs(x)
        else {
          if (d.values === undefined) { d.values = {}; delete d.sumAbs }
          d.values[v] = (d.values[v] ?? 0) + 1
        }
      }
      columns[h] = d
    }
    const rows = records.filter((_, i) => i % 24 === 0).map((r) => header.map((h) => r[h]))
    const pages: Record<string, unknown> = {}
    for (const r of records.filter((_, i) => i % Math.floor(records.length / PAGE_KEYS) === 0).slice(0, PAGE_KEYS)) {
      const id = r[header[0]]
      const page = await agent.get(`${P}/galaxies/${encodeURIComponent(id)}/results/${revision}`)
      if (page.status !== 200) throw new Error(`galaxy page ${id}: ${page.status}`)
      pages[id] = { methodVersion: page.body.methodVersion, results: page.body.results }
    }
    revisions.push({ revision, header, rows, columns, pages })
    return records.length
  }
  const galaxies = await digest(1)
  const change = await agent.put(`${P}/assumptions`).set('X-CSRF-Token', csrf).send({ settings: REVISION_2, note: 'digest' })
  if (change.status !== 201) throw new Error(`assumptions: ${change.status} ${JSON.stringify(change.body)}`)
  for (let i = 0; ; i++) {
    const j = (await agent.get(`${P}/jobs/${change.body.job.id}`)).body
    if (j.status === 'done') break
    if (j.status === 'failed' || i > 3000) throw new Error(`recompute: ${JSON.stringify(j)}`)
    await sleep(20)
  }
  await digest(change.body.revision.revision)
  return { galaxies, revisions }
}

// `npm run bench:intake`: a 200,000-row CSV (Lantern-style galaxies, every line with flux and error)
// committed through the wizard's API as a background `intake` job. Prints the time to the 202, the
// job's duration, the longest stall of the server's event loop and the server process's peak RSS.
import { mkdtempSync, openAsBlob, rmSync, statSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { monitorEventLoopDelay } from 'node:perf_hooks'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { LINE_IDS } from '../../shared/vocabulary/lines.ts'
import { benchServer } from './bench-env.ts'

const N = Number(process.env.BENCH_ROWS ?? 200_000)
const env = await benchServer({ UPLOAD_LIMIT_MB: '500', INTAKE_MAX_ROWS: String(Math.max(N, 1_000_000)) })
/** Writes the CSV to a file and returns its path, so that none of it stays in this process's memory. */
function writeCsv(): string {
  const galaxies = generateLanternSurvey(N, 11)
  const header = ['id', 'z', ...LINE_IDS.flatMap((l) => [`${l}_flux`, `${l}_err`, `${l}_limit`])]
  const cell = (v: number | undefined) => (v === undefined ? '' : String(v))
  const rows = galaxies.map((g) => [g.id, cell(g.redshift), ...LINE_IDS.flatMap((l) => {
    const v = g.lines[l] as { flux?: number; error?: number; upperLimit?: number } | undefined
    return [cell(v?.flux), cell(v?.error), cell(v?.upperLimit)]
  })].join(','))
  const file = join(mkdtempSync(join(tmpdir(), 'rg-bench-')), 'bench.csv')
  writeFileSync(file, [header.join(','), ...rows].join('\n'))
  return file
}
const file = writeCsv()
console.log(`${N} rows, ${(statSync(file).size / 1e6).toFixed(1)} MB of CSV`)

const auth = { authorization: `Bearer ${env.key}` }
const base = `${env.rt.url}/api/v1/projects/${env.projectId}`
const form = new FormData()
form.append('file', await openAsBlob(file, { type: 'text/csv' }), 'bench.csv')
const staged = await (await fetch(`${base}/intakes/csv`, { method: 'POST', headers: auth, body: form })).json()
if (!staged.intake) throw new Error(`staging failed: ${JSON.stringify(staged)}`)
rmSync(join(file, '..'), { recursive: true, force: true })
;(globalThis as { gc?: () => void }).gc?.()

const loop = monitorEventLoopDelay({ resolution: 10 })
let peakRss = process.memoryUsage().rss
const rssBefore = peakRss
const sampler = setInterval(() => { peakRss = Math.max(peakRss, process.memoryUsage().rss) }, 50)
loop.enable()
const t0 = performance.now()
const res = await fetch(`${base}/intakes/${staged.intake.id}/commit`, {
  method: 'POST', headers: { ...auth, 'content-type': 'application/json' }, body: JSON.stringify({ mapping: staged.suggestedMapping, fluxUnit: 1e-17 }),
})
const answered = performance.now() - t0
const { job } = await res.json()
if (res.status !== 202) throw new Error(`commit answered ${res.status}`)
let j = job
const rssAt: string[] = []
while (j.status !== 'done' && j.status !== 'failed') {
  await new Promise((ok) => setTimeout(ok, 250))
  j = await (await fetch(`${base}/jobs/${job.id}`, { headers: auth })).json()
  // memory along the way: flat if the intake is streamed
  if (j.done >= ((rssAt.length + 1) * N) / 5 && rssAt.length < 4) rssAt.push(`${j.done}: ${(process.memoryUsage().rss / 1e6).toFixed(0)} MB`)
}
const took = (performance.now() - t0) / 1000
loop.disable(); clearInterval(sampler)
if (j.status !== 'done') throw new Error(`the intake job failed: ${j.error}`)
console.log(`commit answered ${res.status} in ${answered.toFixed(0)} ms; the job stored ${j.done} rows in ${took.toFixed(1)} s (${(N / took).toFixed(0)} rows/s)`)
console.log(`server event loop (same process): longest stall ${(loop.max / 1e6).toFixed(0)} ms, p99 ${(loop.percentile(99) / 1e6).toFixed(0)} ms`)
console.log(`process RSS (server and benchmark in one process): ${(rssBefore / 1e6).toFixed(0)} MB before the commit, peak ${(peakRss / 1e6).toFixed(0)} MB during it; by rows stored: ${rssAt.join(', ')}`)
await env.close()

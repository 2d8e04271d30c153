// `npm run bench:api`: 100,000 synthetic galaxies (12+ lines each) through the batch endpoint on
// loopback, stored and queryable; against the floor of PostgreSQL's COPY of the same raw input rows into
// a plain table in the same run; the storage per galaxy; then the diagram query.
import { pipeline } from 'node:stream/promises'
import { Readable } from 'node:stream'
import pg from 'pg'
import { from as copyFrom } from 'pg-copy-streams'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { benchServer } from './bench-env.ts'
import { DIAGRAM_COLUMNS_TYPE } from '../../shared/diagram-columns.ts'
import { LINES } from '../../shared/vocabulary/lines.ts'

/** Lines of text joined into chunks of `n` (one COPY write per chunk). */
function* chunked(lines: string[], n: number) { for (let i = 0; i < lines.length; i += n) yield lines.slice(i, i + n).join('') }

const N = Number(process.env.BENCH_GALAXIES ?? 100_000)
const BATCH = 10_000
const env = await benchServer()
const galaxies = generateLanternSurvey(N, 7).map(({ population: _p, ...g }) => g)
const lines = galaxies.reduce((s, g) => s + Object.keys(g.lines).length, 0) / N
console.log(`${N} galaxies, ${lines.toFixed(1)} lines each on average`)

// two requests in flight, as a pipeline would send them: one computes while the other is written
const CONCURRENCY = Number(process.env.BENCH_CONCURRENCY ?? 2)
const bodies = Array.from({ length: Math.ceil(N / BATCH) }, (_, b) => JSON.stringify({ galaxies: galaxies.slice(b * BATCH, (b + 1) * BATCH) }))
const t0 = performance.now()
let next = 0
await Promise.all(Array.from({ length: CONCURRENCY }, async () => {
  while (next < bodies.length) {
    const b = next++
    const res = await fetch(`${env.rt.url}/api/v1/projects/${env.projectId}/galaxies/batch`, {
      method: 'POST', headers: { authorization: `Bearer ${env.key}`, 'content-type': 'application/json', 'idempotency-key': `bench-${b}` }, body: bodies[b],
    })
    if (res.status !== 200) throw new Error(`batch ${b}: ${res.status} ${await res.text()}`)
  }
}))
const apiS = (performance.now() - t0) / 1000
console.log(`batch API (${CONCURRENCY} requests in flight): ${N} galaxies ingested and computed in ${apiS.toFixed(2)} s → ${(N / apiS).toFixed(0)} galaxies/s`)

// The floor: PostgreSQL's own COPY of the raw input rows (id, z, flux and error of every line) into
// a plain table, in the same run on the same database; the text is built before the clock starts.
const client = new pg.Client({ connectionString: env.pg.url })
await client.connect()
const LINE_IDS = LINES.map((l) => l.id)
await client.query(`create table bench_input (id text, z double precision, ${LINE_IDS.map((l) => `${l}_flux double precision, ${l}_err double precision`).join(', ')})`)
const cell = (v: number | undefined) => (v === undefined ? '\\N' : String(v))
const inputText = galaxies.map((g) => [g.id, g.redshift, ...LINE_IDS.flatMap((l) => {
  const m = (g.lines as Record<string, { flux?: number; error?: number; upperLimit?: number }>)[l]
  return m ? [cell(m.flux ?? m.upperLimit), cell(m.error)] : ['\\N', '\\N']
})].join('\t') + '\n')
const t1 = performance.now()
await client.query('begin')
await pipeline(Readable.from(chunked(inputText, 1000)), client.query(copyFrom('copy bench_input from stdin')))
await client.query('commit')
const copyS = (performance.now() - t1) / 1000
const ratio = apiS / copyS
console.log(`floor: COPY of the ${N} raw input rows into a plain table: ${copyS.toFixed(2)} s → batch API / COPY = ${ratio.toFixed(2)}× (target ≤ 3×)`)

// storage: what a revision of results and the galaxies' own rows take, per galaxy (tables, TOAST and indexes)
const { rows: [size] } = await client.query(`select (select count(*) from results where project_id = $1)::float8 as results,
  (select count(*) from galaxies where project_id = $1)::float8 as galaxies,
  pg_total_relation_size('results')::float8 as results_bytes, pg_total_relation_size('galaxies')::float8 as galaxies_bytes,
  pg_total_relation_size('bench_input')::float8 as input_bytes`, [env.projectId])
console.log(`storage per galaxy: results ${(size.results_bytes / size.results).toFixed(0)} B per revision (target ≤ 500 B), galaxies ${(size.galaxies_bytes / size.galaxies).toFixed(0)} B, the raw input table ${(size.input_bytes / N).toFixed(0)} B`)

/** Five reads of the diagram columns in one representation: median and best time, bytes on the wire and decoded. */
async function diagramReads(accept: string) {
  const times: number[] = []
  let bytes = 0
  for (let i = 0; i < 5; i++) {
    const t = performance.now()
    const res = await fetch(`${env.rt.url}/api/v1/projects/${env.projectId}/diagram`, { headers: { authorization: `Bearer ${env.key}`, accept } })
    const body = await res.arrayBuffer()
    bytes = body.byteLength
    times.push(performance.now() - t)
  }
  // fetch inflates the body; the gzipped size on the wire is in Content-Length
  const gz = await fetch(`${env.rt.url}/api/v1/projects/${env.projectId}/diagram`, { headers: { authorization: `Bearer ${env.key}`, accept, 'accept-encoding': 'gzip' } })
  await gz.arrayBuffer()
  times.sort((a, b) => a - b)
  return { median: times[2], best: times[0], mb: bytes / 1e6, wireMb: Number(gz.headers.get('content-length') ?? 0) / 1e6 }
}
const json = await diagramReads('application/json')
console.log(`diagram data for ${N} galaxies (JSON): median ${json.median.toFixed(0)} ms (best ${json.best.toFixed(0)} ms), ${json.mb.toFixed(1)} MB, ${json.wireMb.toFixed(1)} MB gzipped (target ≤ 1000 ms)`)
const bin = await diagramReads(DIAGRAM_COLUMNS_TYPE)
console.log(`diagram data for ${N} galaxies (binary columns, what the dashboard reads): median ${bin.median.toFixed(0)} ms (best ${bin.best.toFixed(0)} ms), ${bin.mb.toFixed(1)} MB, ${bin.wireMb.toFixed(1)} MB gzipped`)
console.log(`target: ${N} galaxies in ≤ ${(N / 100_000 * 3).toFixed(0)} s and ≤ 3× the COPY floor → ${apiS <= N / 100_000 * 3 && ratio <= 3 ? 'met' : 'missed'} (${apiS.toFixed(2)} s, ${ratio.toFixed(2)}×)`)
await client.end()
await env.close()

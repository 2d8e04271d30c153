// `npm run bench:api`: 100,000 synthetic galaxies (12+ lines each) through the batch endpoint on
// loopback, then the same rows loaded with PostgreSQL COPY into the same tables, then the diagram query.
import { pipeline } from 'node:stream/promises'
import { Readable } from 'node:stream'
import pg from 'pg'
import { from as copyFrom } from 'pg-copy-streams'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { benchServer } from './bench-env.ts'
import { DIAGRAM_COLUMNS_TYPE } from '../../shared/diagram-columns.ts'

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

// COPY the same stored rows (galaxies + results) into the same tables under a second project
const client = new pg.Client({ connectionString: env.pg.url })
await client.connect()
const { rows: [p2] } = await client.query("insert into projects (name) values ('copy target') returning id")
const galaxyCsv = (await client.query(`select key, redshift, ra, dec, flux_unit, input::text as input from galaxies where project_id = $1 order by id`, [env.projectId])).rows
const resultCsv = (await client.query(`select g.key, r.* from results r join galaxies g on g.id = r.galaxy_id where r.project_id = $1 order by g.id`, [env.projectId])).rows
const esc = (v: unknown) => (v === null || v === undefined ? '\\N' : String(v).replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n'))
const t1 = performance.now()
await client.query('begin')
await pipeline(Readable.from(galaxyCsv.map((r) => [p2.id, r.key, r.redshift, r.ra, r.dec, r.flux_unit, r.input].map(esc).join('\t') + '\n')),
  client.query(copyFrom('copy galaxies (project_id, key, redshift, ra, dec, flux_unit, input) from stdin')))
const ids = new Map((await client.query('select key, id from galaxies where project_id = $1', [p2.id])).rows.map((r) => [r.key, r.id]))
const cols = Object.keys(resultCsv[0]).filter((c) => c !== 'key' && c !== 'galaxy_id' && c !== 'project_id')
await pipeline(Readable.from(resultCsv.map((r) => [ids.get(r.key), p2.id, ...cols.map((c) => (c === 'result' ? JSON.stringify(r[c]) : c === 'computed_at' ? r[c].toISOString() : r[c]))].map(esc).join('\t') + '\n')),
  client.query(copyFrom(`copy results (galaxy_id, project_id, ${cols.join(', ')}) from stdin`)))
await client.query('commit')
const copyS = (performance.now() - t1) / 1000
console.log(`COPY of the same rows: ${copyS.toFixed(2)} s → batch API / COPY = ${(apiS / copyS).toFixed(2)}× (target ≤ 3×)`)

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
console.log(`target: ${N} galaxies in ≤ 30 s → ${apiS <= 30 ? 'met' : 'missed'}`)
await client.end()
await env.close()

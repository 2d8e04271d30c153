// `npm run bench:load`: autocannon on loopback, 50 connections for 20 s, against the stateless
// diagnostics endpoint and against the diagram query of a 100,000-galaxy project.
import autocannon from 'autocannon'
import { benchServer, loadGalaxies } from './bench-env.ts'

const N = Number(process.env.BENCH_GALAXIES ?? 100_000)
const DURATION = Number(process.env.BENCH_SECONDS ?? 20)
const env = await benchServer()
const galaxies = await loadGalaxies(env, N, 11)
console.log(`project loaded with ${N} galaxies`)

async function run(title: string, opts: autocannon.Options) {
  // the load generator runs in a worker thread so that it does not share the server's event loop
  const r = await autocannon({ connections: 50, duration: DURATION, workers: 1, timeout: 30, ...opts })
  const errors = r.errors + r.timeouts + r.non2xx
  console.log(`${title}: ${r.requests.average.toFixed(0)} req/s, latency p50 ${r.latency.p50} ms, p99 ${r.latency.p99} ms, ${r.requests.total} requests, errors ${errors} (non-2xx ${r.non2xx}, timeouts ${r.timeouts}); status codes ${JSON.stringify(r.statusCodeStats)}`)
  return errors
}

const body = JSON.stringify({ galaxies: [galaxies[0]] })
let errors = await run('POST /api/v1/diagnostics (1 galaxy)', {
  url: `${env.rt.url}/api/v1/diagnostics`, method: 'POST', body, headers: { 'content-type': 'application/json', authorization: `Bearer ${env.key}` },
})
errors += await run(`GET diagram (${N} galaxies)`, {
  url: `${env.rt.url}/api/v1/projects/${env.projectId}/diagram`, headers: { authorization: `Bearer ${env.key}`, 'accept-encoding': 'gzip' }, connections: 50, // as a browser asks
})
console.log(errors === 0 ? 'zero errors' : `${errors} errors`)
await env.close()

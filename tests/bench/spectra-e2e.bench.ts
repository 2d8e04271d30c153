/**
 * End-to-end spectra benchmark (`npm run bench:spectra-e2e`): figures printed, not a timed test.
 *
 * N invented 4,000-pixel spectra (default 10,000; BENCH_SPECTRA_E2E) are written as FITS files (flux
 * image + inverse-variance extension, tests/helpers/fits-writer.ts) into zips of at most 1,000, the
 * most one upload takes. Against a server of this process on its own durable PostgreSQL:
 *   1. upload: each zip POSTed to /projects/:id/spectra (multipart), one after another, as a survey
 *      client would; each answer (202) carries the upload's `fit` job, which starts at once;
 *   2. fit: until every job is done — the spectra fitted on the compute threads under the revision's
 *      fit settings, the lines written as the galaxies' measurements and diagnosed. The settings are
 *      the standard set of bench:spectra (one Gaussian component, no broad Hα, no Na I D), or with
 *      BENCH_FIT=default the project default (broad Hα auto, Na I D);
 *   3. read back: the galaxies CSV export (every galaxy with its class) and the line-measurement CSV.
 * The sum of the three is the end-to-end time (target ≤ 60 s on this machine using every core).
 * Meanwhile a worker thread GETs /api/health every 20 ms: its p50/p99 show whether fitting ever
 * stalls other requests (it runs off the event loop). The client requests also run on worker
 * threads, so the server's event loop is its own.
 *
 * The mix: 85 % narrow-line nuclei with every complex, 10 % with broad Hα, 5 % with Na I D
 * absorption (all invented, seeded).
 */
import { Worker } from 'node:worker_threads'
import { availableParallelism } from 'node:os'
import { benchServer } from './bench-env.ts'
import { fitsSpectrum } from '../helpers/fits-writer.ts'
import { zipOf } from '../helpers/spectra.ts'
import { createRng } from '../../shared/stats/rng.ts'
import { syntheticSpectrum, type SyntheticLine } from '../../shared/spectra/index.ts'

const N = Number(process.env.BENCH_SPECTRA_E2E ?? 10_000)
const PER_UPLOAD = 1000
const TARGET_S = 60
const threads = Number(process.env.COMPUTE_THREADS ?? availableParallelism())
const FIT = process.env.BENCH_FIT === 'default' ? 'default' : 'standard'

/** One invented nucleus: 4,000 pixels of 0.9 Å from 3700 Å (observed), z = 0.02–0.06. */
function makeSpectrum(i: number) {
  const rng = createRng(9000 + i)
  const u = (a: number, b: number): number => a + (b - a) * rng.nextFloat()
  const v = u(-150, 150), sigma = u(60, 250), k = u(0.5, 2), z = u(0.02, 0.06)
  const kind = i % 20 === 0 ? 'nad' : i % 10 === 5 ? 'broad' : 'narrow'
  const base: [SyntheticLine['id'], number][] = [
    ['oii_3726', 160], ['oii_3729', 210], ['hgamma', 55], ['hbeta', 120], ['oiii_5007', u(100, 1000)],
    ['oi_6300', 40], ['halpha', 400], ['nii_6584', u(100, 500)], ['sii_6717', 90], ['sii_6731', 70],
  ]
  const lines: SyntheticLine[] = base.map(([id, f]) => ({ id, flux: k * f, velocity: v, sigma }))
  if (kind === 'broad') lines.push({ id: 'halpha_broad', flux: k * 2500, sigma: u(1200, 2000), velocity: v + 100 })
  const s = syntheticSpectrum({
    seed: 50_000 + i, id: `E2E-${String(i).padStart(6, '0')}`, redshift: z, wavelength: { start: 3700, end: 7299.1, step: 0.9 },
    continuum: { level: 10, slope: -0.05 }, noise: 0.5, resolution: { fwhmAngstrom: 2.5 }, lines,
    ...(kind === 'nad' ? { nad: { logN: u(12.8, 13.6), b: u(60, 150), velocity: u(-200, 0) } } : {}),
  })
  const ivar = s.spectrum.error.map((e) => 1 / (e * e))
  return fitsSpectrum({ object: s.spectrum.id, redshift: z, start: 3700, step: 0.9, flux: s.spectrum.flux, noise: { kind: 'ivar', values: ivar }, bunit: '1e-17 erg/s/cm2/Angstrom' })
}

/** A multipart body: the zip in `files`, the instrument's resolution in `defaults`. */
function multipart(zip: Buffer, name: string) {
  const boundary = `----bench${Math.random().toString(16).slice(2)}`
  const head = (field: string, extra = '') => `--${boundary}\r\nContent-Disposition: form-data; name="${field}"${extra}\r\n`
  const body = Buffer.concat([
    Buffer.from(`${head('defaults')}\r\n${JSON.stringify({ resolution: { fwhmAngstrom: 2.5 } })}\r\n`),
    Buffer.from(`${head('files', `; filename="${name}"`)}Content-Type: application/zip\r\n\r\n`), zip, Buffer.from(`\r\n--${boundary}--\r\n`),
  ])
  return { body, contentType: `multipart/form-data; boundary=${boundary}` }
}

console.log(`spectra e2e bench: ${N.toLocaleString('en-US')} spectra of 4,000 pixels in zips of ${PER_UPLOAD}, fit settings: ${FIT === 'standard' ? 'the standard set (one Gaussian component, no broad Hα, no Na I D)' : 'the project default (one component, broad Hα auto, Na I D)'}, ${threads} compute thread(s), ${availableParallelism()} core(s), node ${process.version}`)
let t = performance.now()
const zips: Buffer[] = []
for (let at = 0; at < N; at += PER_UPLOAD) {
  const entries: Array<[string, Buffer]> = []
  for (let i = at; i < Math.min(N, at + PER_UPLOAD); i++) entries.push([`E2E-${String(i).padStart(6, '0')}.fits`, Buffer.from(makeSpectrum(i))])
  zips.push(await zipOf(entries))
}
const uploadBytes = zips.reduce((a, z) => a + z.length, 0)
console.log(`  ${zips.length} zips, ${(uploadBytes / 1048576).toFixed(0)} MB, generated in ${((performance.now() - t) / 1000).toFixed(1)} s (not timed)`)

const env = await benchServer({ COMPUTE_THREADS: String(threads), DIAGRAM_WARMUP_MS: '0' })
const base = env.rt.url
const auth = { authorization: `Bearer ${env.key}` }
const api = `${base}/api/v1/projects/${env.projectId}`

const probe = (data: object) => new Worker(new URL('./liveness-probe.mjs', import.meta.url), { workerData: data })
const once = <T>(w: Worker) => new Promise<T>((ok, fail) => { w.once('message', ok); w.once('error', fail) })
const quantile = (xs: number[], q: number) => { const s = [...xs].sort((a, b) => a - b); return s[Math.min(s.length - 1, Math.floor(q * s.length))] ?? NaN }
interface Answer { status: number; ms: number; bytes: number; json: string | null }
// one client thread sends every request of the bench (a thread per request costs more CPU than the requests)
const client = probe({ role: 'client' })
let nextId = 0
const answers = new Map<number, (a: Answer) => void>()
client.on('message', (a: Answer & { id: number }) => { answers.get(a.id)?.(a); answers.delete(a.id) })
const send = (url: string, init: { method?: string; headers?: Record<string, string>; body?: Uint8Array; whole?: boolean } = {}) => new Promise<Answer>((ok) => {
  const id = nextId++
  answers.set(id, ok)
  client.postMessage({ id, url, method: init.method ?? 'GET', headers: init.headers ?? {}, body: init.body, whole: init.whole })
})

// the fit settings of the project's revision: the standard set (one Gaussian component, no broad Hα, no
// Na I D, as in bench:spectra) unless BENCH_FIT=default, the project default (broad Hα auto, Na I D)
if (FIT === 'standard') {
  const res = await fetch(`${api}/assumptions`, { method: 'PUT', headers: { ...auth, 'content-type': 'application/json' },
    body: JSON.stringify({ settings: { fit: { components: 1, broadHalpha: 'off', absorption: [] } }, note: 'bench: the standard set' }) })
  if (res.status !== 201) throw new Error(`assumptions: ${res.status} ${await res.text()}`)
  const { job } = await res.json() as { job: { id: string } }
  while ((await (await fetch(`${api}/jobs/${job.id}`, { headers: auth })).json() as { status: string }).status !== 'done') await new Promise((ok) => setTimeout(ok, 50))
}

const sampler = probe({ role: 'health', url: `${base}/api/health`, everyMs: 20, maxSamples: 1_000_000 })
const health = once<{ latencies: number[]; errors: number }>(sampler)
await new Promise((ok) => setTimeout(ok, 200))

// 1. upload
const t0 = performance.now()
const jobIds: string[] = []
const uploadMs: number[] = []
for (const [k, zip] of zips.entries()) {
  const { body, contentType } = multipart(zip, `part-${k + 1}.zip`)
  const a = await send(`${api}/spectra`, { method: 'POST', headers: { ...auth, 'content-type': contentType }, body, whole: true })
  if (a.status !== 202 || !a.json) throw new Error(`upload ${k + 1}: ${a.status} ${a.json?.slice(0, 500)}`)
  const out = JSON.parse(a.json) as { upload: { spectrumCount: number }; job: { id: string } }
  if (out.upload.spectrumCount !== Math.min(PER_UPLOAD, N - k * PER_UPLOAD)) throw new Error(`upload ${k + 1} stored ${out.upload.spectrumCount} spectra`)
  jobIds.push(out.job.id)
  uploadMs.push(a.ms)
}
const t1 = performance.now()

// 2. fit (and write, and diagnose): poll the jobs
let fitted = 0
for (;;) {
  const states = await Promise.all(jobIds.map(async (id) => JSON.parse((await send(`${api}/jobs/${id}`, { headers: auth })).json!) as { status: string; done: number; error?: string | null }))
  const failed = states.find((s) => s.status === 'failed')
  if (failed) throw new Error(`a fit job failed: ${failed.error}`)
  fitted = states.reduce((a, s) => a + s.done, 0)
  if (states.every((s) => s.status === 'done')) break
  await new Promise((ok) => setTimeout(ok, 200))
}
const t2 = performance.now()

// 3. read back: every galaxy with its diagnosis, and the line measurements
const galaxiesCsv = await send(`${api}/exports/galaxies.csv`, { headers: auth })
const linesCsv = await send(`${api}/exports/lines.csv`, { headers: auth })
const t3 = performance.now()
if (galaxiesCsv.status !== 200 || linesCsv.status !== 200) throw new Error(`exports: ${galaxiesCsv.status} ${linesCsv.status}`)

sampler.postMessage('stop')
client.postMessage('stop')
const { latencies, errors } = await health

// what was stored (checked outside the timing)
const counts = (await env.rt.db.execute<{ galaxies: number; fits: number; classified: number; broad: number }>(
  `select (select count(*)::int from galaxies where project_id = '${env.projectId}') as galaxies,
          (select count(*)::int from line_fits where project_id = '${env.projectId}' and (result->'fit') is not null and jsonb_typeof(result->'fit') = 'object') as fits,
          (select count(*)::int from line_fits where project_id = '${env.projectId}' and detections > 0) as classified,
          (select count(*)::int from line_fits where project_id = '${env.projectId}' and (result->'fit'->>'broadHalpha')::boolean) as broad`)).rows[0]!

const s = (a: number, b: number) => (b - a) / 1000
const total = s(t0, t3)
console.log(`  1. upload   ${s(t0, t1).toFixed(1)} s: ${zips.length} uploads of ${PER_UPLOAD}, each ${quantile(uploadMs, 0.5).toFixed(0)} ms median, ${Math.max(...uploadMs).toFixed(0)} ms max (${(uploadBytes / 1048576 / s(t0, t1)).toFixed(0)} MB/s)`)
console.log(`  2. fit      ${s(t1, t2).toFixed(1)} s more after the last upload (fitting overlaps the uploads): ${fitted.toLocaleString('en-US')} spectra, ${(N / s(t0, t2)).toFixed(0)} spectra/s from the first upload`)
console.log(`  3. read     ${s(t2, t3).toFixed(1)} s: galaxies.csv ${(galaxiesCsv.bytes / 1048576).toFixed(1)} MB in ${galaxiesCsv.ms.toFixed(0)} ms, lines.csv ${(linesCsv.bytes / 1048576).toFixed(1)} MB in ${linesCsv.ms.toFixed(0)} ms`)
console.log(`  stored: ${counts.galaxies.toLocaleString('en-US')} galaxies, ${counts.fits.toLocaleString('en-US')} fits (${counts.classified.toLocaleString('en-US')} with detections, ${counts.broad.toLocaleString('en-US')} with broad Hα)`)
console.log(`  end to end: ${total.toFixed(1)} s for ${N.toLocaleString('en-US')} spectra → ${total <= TARGET_S * (N / 10_000) ? 'met' : 'missed'} (target ≤ ${TARGET_S} s per 10,000)`)
console.log(`  /api/health during it: p50 ${quantile(latencies, 0.5).toFixed(1)} ms, p99 ${quantile(latencies, 0.99).toFixed(1)} ms, max ${Math.max(...latencies).toFixed(0)} ms (${latencies.length} samples, ${errors} errors)`)
if (counts.galaxies !== N || counts.fits !== N) { console.error(`expected ${N} galaxies and fits`); process.exitCode = 1 }
await env.close()

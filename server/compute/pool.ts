import { Piscina } from 'piscina'
import type { Config } from '../config.ts'
import { HttpProblem } from '../http/problem.ts'
import type { GalaxyInputDto, Settings } from '../../shared/schemas/galaxy.schema.ts'
import type { GalaxyResult } from '../../shared/science.ts'
import { diagnoseTask, isFailure, type DiagnoseTask, type OutputMode, type TaskFailure, type TaskOutput } from './diagnose.task.ts'
import { GALAXY_COST } from './budget.ts'
import { encodeDiagramTask, type DiagramTask } from './diagram.task.ts'
import { parseBodyTask, type ParseBodyOutput, type ParseBodyTask } from './parse-body.task.ts'
import { readSpectraTask, type DeflatedEntry, type ReadSpectraOutput, type ReadSpectraTask } from './read-spectra.task.ts'
import { fitSpectrumTask, type FitSpectrumOutput, type FitSpectrumTask } from './fit-spectra.task.ts'

/** The pool's part of the configuration (server/config.ts). */
export type ComputeSettings = Pick<Config, 'computeThreads' | 'computeQueue' | 'computeTimeoutMs'>

export interface ComputeOptions {
  /** JSON Pointer of the galaxies array in the request, for error paths */
  prefix?: string
  /**
   * Interactive work (an HTTP request waiting for the answer) is refused with 503 when the queue is
   * full and has one deadline for the whole request. Background work (jobs) waits for its turn and
   * the deadline applies to each chunk.
   */
  interactive?: boolean
  /** aborted when the caller no longer wants the answer (the client went away) */
  signal?: AbortSignal
}

export interface ComputePool {
  readonly threads: number
  readonly closed: boolean
  /** chunks waiting for a thread ahead of the background spectrum fits (what a new request would queue behind) */
  readonly queued: number
  /** Runs the science chain over `galaxies` in chunks; one output per chunk, in order. */
  run(mode: OutputMode, galaxies: GalaxyInputDto[], settings: Settings, opts?: ComputeOptions): Promise<TaskOutput[]>
  /** The binary columns of a diagram document (its JSON as UTF-8); background work. */
  encodeDiagram(json: Uint8Array): Promise<Uint8Array>
  /**
   * JSON.parse, validation and request hash of a bulk body (parse-body.task.ts). The bytes are
   * handed to the thread, not copied: the caller must not use them afterwards. It waits its turn
   * like background work (no 503 for a full queue), under the time budget of one chunk.
   */
  parseBody(task: Omit<ParseBodyTask, 'kind'>, signal?: AbortSignal): Promise<ParseBodyOutput>
  /** Reads one spectrum file (FITS or text; a deflated zip entry is expanded first) and checks its spectra; the bytes are handed over (a view into a larger buffer is copied first). */
  readSpectra(bytes: Uint8Array, deflated?: DeflatedEntry): Promise<ReadSpectraOutput>
  /**
   * Fits one spectrum. Background work waits behind all other work; `interactive` (a request waiting for the
   * answer) is refused with 503 when the queue is full and stopped at the time budget.
   */
  fitSpectrum(task: Omit<FitSpectrumTask, 'kind'>, opts?: { interactive?: boolean }): Promise<FitSpectrumOutput>
  close(): Promise<void>
}

/**
 * Galaxies per chunk: about CHUNK_UNITS of work (≈ 0.3 s on one core), so a long request yields a
 * thread to others between chunks, and at most an equal share per thread, so a large batch uses
 * every thread.
 */
export const CHUNK_UNITS = 50_000
/** Copying a chunk's galaxies to a thread and its answer back runs on the event loop: ≈ 10 ms per 1,000 galaxies. */
export const CHUNK_GALAXIES = 1000
export function chunkSize(galaxies: number, draws: number, threads: number) {
  const byCost = Math.floor(CHUNK_UNITS / (Math.max(0, draws) + GALAXY_COST))
  return Math.max(1, Math.min(byCost, CHUNK_GALAXIES, Math.ceil(galaxies / threads)))
}

const busy = () => new HttpProblem(503, 'Service Unavailable', 'the compute queue is full; try again shortly', undefined, { 'Retry-After': '5' })
export const tooLong = (ms: number) => new HttpProblem(503, 'Service Unavailable',
  `the computation ran longer than the ${ms / 1000} s time budget and was stopped; send fewer galaxies or Monte Carlo draws per request`, undefined, { 'Retry-After': '30' })

export const gone = () => new HttpProblem(400, 'Bad Request', 'the request was aborted')

function failureProblem(f: TaskFailure, offset: number, prefix: string) {
  if (f.failed === 'settings') return new HttpProblem(422, 'Unprocessable Content', f.message, [{ path: f.path, message: f.message }])
  const chunkPath = f.index >= 0 ? `/${f.index}${f.rest}` : f.rest
  const path = f.index >= 0 ? `/${offset + f.index}${f.rest}` : f.rest
  const message = f.message.split(chunkPath).join(path)
  return new HttpProblem(422, 'Unprocessable Content', message, [{ path: prefix + path, message }])
}

type Exec = (task: DiagnoseTask, signal: AbortSignal | undefined) => Promise<TaskOutput | TaskFailure>

/** Chunking, ordering, deadlines and error paths, shared by the thread pool and the in-process runner. */
function runner(threads: number, exec: Exec, queued: () => number, s: ComputeSettings) {
  return async (mode: OutputMode, galaxies: GalaxyInputDto[], settings: Settings, opts: ComputeOptions = {}): Promise<TaskOutput[]> => {
    const prefix = opts.prefix ?? '/galaxies'
    if (opts.interactive && queued() >= s.computeQueue) throw busy()
    const size = chunkSize(galaxies.length, settings.monteCarlo.draws, threads)
    const starts: number[] = []
    for (let i = 0; i < galaxies.length; i += size) starts.push(i)
    const timed = Number.isFinite(s.computeTimeoutMs) && s.computeTimeoutMs > 0
    const deadline = opts.interactive && timed ? AbortSignal.timeout(s.computeTimeoutMs) : undefined
    const outputs: TaskOutput[] = new Array(starts.length)
    let next = 0
    let failure: unknown
    // at most one chunk per thread in flight for each request, so concurrent requests take turns
    const lane = async () => {
      while (next < starts.length && failure === undefined) {
        const k = next++
        const start = starts[k]
        const chunkDeadline = deadline ?? (timed ? AbortSignal.timeout(s.computeTimeoutMs) : undefined)
        const signals = [chunkDeadline, opts.signal].filter((x): x is AbortSignal => x !== undefined)
        try {
          if (opts.signal?.aborted) throw gone()
          const out = await exec({ mode, galaxies: galaxies.slice(start, start + size), settings }, signals.length > 1 ? AbortSignal.any(signals) : signals[0])
          if (isFailure(out)) throw failureProblem(out, start, prefix)
          outputs[k] = out
        } catch (err) {
          // the other lanes stop taking chunks; those already running finish (≤ one chunk each),
          // since aborting a running chunk costs its thread
          failure ??= chunkDeadline?.aborted ? tooLong(s.computeTimeoutMs) : opts.signal?.aborted ? gone() : err
        }
      }
    }
    await Promise.all(Array.from({ length: Math.min(threads, starts.length) }, lane))
    if (failure !== undefined) throw failure
    return outputs
  }
}

/**
 * Background fits handed to each thread at once: the second waits in the thread's own port and
 * starts the moment the first ends. With one, a thread idles from the end of each task until the event loop
 * (busy writing a chunk, say) gets round to sending the next: bench:spectra-e2e saw fits of 2.4 ms
 * take 4.9 ms a fit so.
 */
const TASKS_PER_THREAD = 2

/** The science in worker threads (piscina), created once by the runtime and injected through AppDeps. */
export function createComputePool(s: ComputeSettings): ComputePool {
  const threads = Math.max(1, Math.floor(s.computeThreads))
  const piscina = new Piscina({
    filename: new URL('./worker.mjs', import.meta.url).href,
    minThreads: threads, maxThreads: threads,
    concurrentTasksPerWorker: TASKS_PER_THREAD,
    // workers register tsx themselves; the parent's loader flags would load it twice
    execArgv: [],
    // on a busy machine the kernel serves the event loop (health, reads) before the compute threads
    niceIncrement: 5,
  })
  // Our own first-come-first-served queue: piscina keeps abortable tasks in a queue that, under steady
  // load, serves them out of order (bench:liveness saw p50 5 ms beside p99 1–10 s), so a chunk goes to
  // piscina only when a thread has room for it (TASKS_PER_THREAD).
  // Two lanes: work someone waits for (requests, the diagnostics of a chunk being written) goes before
  // the background spectrum fits of jobs, which can queue by the thousand.
  interface Job { task: object; signal?: AbortSignal; transferList?: ArrayBuffer[]; ok: (v: unknown) => void; fail: (e: unknown) => void; dequeued: () => void }
  const waiting: Job[] = []
  const background: Job[] = []
  let running = 0
  const pump = () => {
    for (;;) {
      // work someone waits for takes a free thread (so a chunk waiting is counted in `queued`, and none
      // waits behind another in a thread's port); background fits fill each thread's port as well,
      // but only while no such work waits (then the threads drain to it)
      const lane = waiting.length > 0 ? waiting : background
      if (lane.length === 0 || running >= (lane === waiting ? threads : threads * TASKS_PER_THREAD)) break
      const job = lane.shift()!
      job.dequeued()
      if (job.signal?.aborted) { job.fail(job.signal.reason); continue }
      running++
      piscina.run(job.task, { signal: job.signal, transferList: job.transferList as never }).then(job.ok, job.fail).finally(() => { running--; pump() })
    }
  }
  const submit = <T>(task: object, signal?: AbortSignal, transferList?: ArrayBuffer[], lane: Job[] = waiting) => new Promise<T>((ok, fail) => {
    // a request's deadline is shared by all its chunks: the listener goes when the chunk leaves the queue
    const onAbort = () => {
      const i = lane.indexOf(job)
      if (i >= 0) { lane.splice(i, 1); job.dequeued(); fail(signal!.reason) }
    }
    const job: Job = { task, signal, transferList, ok: ok as (v: unknown) => void, fail, dequeued: () => signal?.removeEventListener('abort', onAbort) }
    signal?.addEventListener('abort', onAbort)
    lane.push(job)
    pump()
  })
  let closed = false
  const timed = Number.isFinite(s.computeTimeoutMs) && s.computeTimeoutMs > 0
  return {
    threads,
    get closed() { return closed },
    get queued() { return waiting.length },
    run: runner(threads, (task, signal) => submit(task, signal), () => waiting.length, s),
    encodeDiagram: (json) => submit({ kind: 'diagram', json } satisfies DiagramTask, timed ? AbortSignal.timeout(s.computeTimeoutMs) : undefined),
    parseBody: (task, signal) => {
      const deadline = timed ? AbortSignal.timeout(s.computeTimeoutMs) : undefined
      const signals = [deadline, signal].filter((x): x is AbortSignal => x !== undefined)
      const whole = task.bytes.byteOffset === 0 && task.bytes.byteLength === task.bytes.buffer.byteLength && task.bytes.buffer instanceof ArrayBuffer
      return submit<ParseBodyOutput>({ kind: 'parse-body', ...task } satisfies ParseBodyTask, signals.length > 1 ? AbortSignal.any(signals) : signals[0],
        whole ? [task.bytes.buffer as ArrayBuffer] : undefined)
        .catch((err: unknown) => { throw deadline?.aborted ? tooLong(s.computeTimeoutMs) : signal?.aborted ? gone() : err })
    },
    readSpectra: (view, deflated) => {
      // a view into a larger buffer (a zip entry in its archive) is copied: posted as it is, the whole
      // buffer underneath would be cloned for every entry
      const whole = view.byteOffset === 0 && view.byteLength === view.buffer.byteLength && view.buffer instanceof ArrayBuffer
      const bytes = whole ? view : new Uint8Array(view)
      const deadline = timed ? AbortSignal.timeout(s.computeTimeoutMs) : undefined
      return submit<ReadSpectraOutput>({ kind: 'read-spectra', bytes, ...(deflated ? { deflated } : {}) } satisfies ReadSpectraTask, deadline, [bytes.buffer as ArrayBuffer])
        .catch((err: unknown) => { throw deadline?.aborted ? tooLong(s.computeTimeoutMs) : err })
    },
    fitSpectrum: (task, opts = {}) => {
      if (opts.interactive && waiting.length >= s.computeQueue) return Promise.reject(busy())
      const deadline = timed ? AbortSignal.timeout(s.computeTimeoutMs) : undefined
      return submit<FitSpectrumOutput>({ kind: 'fit-spectrum', ...task } satisfies FitSpectrumTask, deadline, undefined, opts.interactive ? waiting : background)
        .catch((err: unknown) => { throw deadline?.aborted ? tooLong(s.computeTimeoutMs) : err })
    },
    async close() {
      closed = true
      for (const job of [...waiting.splice(0), ...background.splice(0)]) job.fail(new Error('the compute pool was closed'))
      await piscina.destroy()
    },
  }
}

/** The same work on the calling thread: for scripts (seed, openapi) and as the reference in tests. */
export function inProcessCompute(s: ComputeSettings = { computeThreads: 1, computeQueue: Number.POSITIVE_INFINITY, computeTimeoutMs: 0 }): ComputePool {
  const exec: Exec = async (task) => diagnoseTask(task)
  return {
    threads: 1, closed: false, queued: 0, run: runner(1, exec, () => 0, s),
    encodeDiagram: async (json) => encodeDiagramTask({ kind: 'diagram', json }),
    parseBody: async (task) => parseBodyTask({ kind: 'parse-body', ...task }),
    readSpectra: async (bytes, deflated) => readSpectraTask({ kind: 'read-spectra', bytes, ...(deflated ? { deflated } : {}) }),
    fitSpectrum: async (task) => fitSpectrumTask({ kind: 'fit-spectrum', ...task }),
    async close() {},
  }
}

/** The results as objects, in order. */
export async function diagnose(pool: ComputePool, galaxies: GalaxyInputDto[], settings: Settings, opts?: ComputeOptions): Promise<GalaxyResult[]> {
  return (await pool.run('objects', galaxies, settings, opts) as GalaxyResult[][]).flat()
}

/** The results as UTF-8 JSON fragments: joined with commas inside brackets they are the results array. */
export async function diagnoseJson(pool: ComputePool, galaxies: GalaxyInputDto[], settings: Settings, opts?: ComputeOptions): Promise<Uint8Array[]> {
  return await pool.run('json', galaxies, settings, opts) as Uint8Array[]
}

/** The binary COPY fields of each galaxy's `results` row, one buffer per chunk (server/services/result-copy.ts). */
export async function diagnoseStored(pool: ComputePool, galaxies: GalaxyInputDto[], settings: Settings, opts?: ComputeOptions): Promise<Uint8Array[]> {
  return await pool.run('stored', galaxies, settings, opts) as Uint8Array[]
}

// Results written by PostgreSQL's binary COPY (documentation: COPY, "Binary Format"; array_recv for
// real[]). The compute threads encode each result's fields from the kernel row (`encodeStoredRows`);
// the event loop only puts the galaxy id and the per-request constants in front (`StoredRows`).
import { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { from as copyFrom } from 'pg-copy-streams'
import type pg from 'pg'
import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import type { ChainRun } from '../../shared/diagnostics/pipeline.ts'
import type { Settings } from '../../shared/schemas/galaxy.schema.ts'
import { RESULTS_COLUMNS } from '../../shared/results/storage.ts'
import { copyColumnReaders } from '../../shared/results/document-map.ts'
import {
  CODES_BYTES, FLOAT4_MAX, MC_CLASS_COUNT, MEASURE_COUNT, PERCENTILE_COUNT, classFractionsOf, codesOf, fitsReal, measuresOf, percentilesOf,
} from '../../shared/results/stored-row.ts'
import { METHOD_VERSION } from '../../shared/science.ts'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type Executor = Db | Tx

const FLOAT4_OID = 700
const FLOAT8_OID = 701

/** Columns of a COPY into `results`, in the order the tuples hold them. */
export const COPY_COLUMNS = ['galaxy_id', 'project_id', 'revision', 'method_version', 'layout', ...RESULTS_COLUMNS.map((c) => c.column),
  'measures', 'measures_exact', 'codes', 'mc_percentiles', 'mc_classes'] as const

/** A growable big-endian byte writer. */
class Writer {
  buf: Uint8Array
  view: DataView
  at = 0
  constructor(size: number) { this.buf = new Uint8Array(size); this.view = new DataView(this.buf.buffer) }
  room(n: number) {
    if (this.at + n <= this.buf.length) return
    const next = new Uint8Array(Math.max(this.buf.length * 2, this.at + n))
    next.set(this.buf.subarray(0, this.at))
    this.buf = next
    this.view = new DataView(next.buffer)
  }
  i16(v: number) { this.view.setInt16(this.at, v); this.at += 2 }
  i32(v: number) { this.view.setInt32(this.at, v); this.at += 4 }
  /** a float4, saturated at its largest finite value (a `real` holds no more) */
  f32(v: number) { this.view.setFloat32(this.at, v > FLOAT4_MAX ? FLOAT4_MAX : v < -FLOAT4_MAX ? -FLOAT4_MAX : v); this.at += 4 }
  bytes(b: Uint8Array) { this.buf.set(b, this.at); this.at += b.length }
  /** one field: `real` or NULL */
  real(v: number | null) { if (v === null || v !== v) this.i32(-1); else { this.i32(4); this.f32(v) } }
  smallint(v: number | null) { if (v === null) this.i32(-1); else { this.i32(2); this.i16(v) } }
  /** one field: a one-dimensional real[] or double precision[] (NaN elements are NULL) */
  floatArray(values: ArrayLike<number>, width: 4 | 8 = 4) {
    let nulls = 0
    for (let k = 0; k < values.length; k++) if (values[k] !== values[k]) nulls++
    const len = 20 + 4 * values.length + width * (values.length - nulls)
    this.room(4 + len)
    this.i32(len)
    this.i32(1); this.i32(nulls > 0 ? 1 : 0); this.i32(width === 4 ? FLOAT4_OID : FLOAT8_OID); this.i32(values.length); this.i32(1)
    for (let k = 0; k < values.length; k++) {
      const v = values[k]
      if (v !== v) this.i32(-1)
      else if (width === 4) { this.i32(4); this.f32(v) }
      else { this.i32(8); this.view.setFloat64(this.at, v); this.at += 8 }
    }
  }
}

/**
 * The fields of every galaxy of a chain run that follow the constants (COPY_COLUMNS from the copy
 * columns to `mc_classes`), each row as [uint32 length][fields]: the event loop puts the galaxy id,
 * project, revision, method version and layout in front.
 */
export function encodeStoredRows(run: ChainRun, galaxies: GalaxyInputDto[], settings: Settings): Uint8Array {
  const n = galaxies.length
  const readers = copyColumnReaders(settings.sfrCalibration)
  const w = new Writer(n * (12 + RESULTS_COLUMNS.length * 8 + 28 + MEASURE_COUNT * 8 + CODES_BYTES) + 64)
  const measures = new Float64Array(MEASURE_COUNT)
  const codes = new Uint8Array(CODES_BYTES)
  const pct = new Float64Array(PERCENTILE_COUNT)
  const cls = new Float64Array(MC_CLASS_COUNT)
  for (let i = 0; i < n; i++) {
    w.room(4 + RESULTS_COLUMNS.length * 8)
    const lengthAt = w.at
    w.at += 4
    for (let c = 0; c < RESULTS_COLUMNS.length; c++) {
      const v = readers[c](run.out, i, galaxies[i])
      if (RESULTS_COLUMNS[c].type === 'real') w.real(v); else w.smallint(v)
    }
    measuresOf(run.out, i, run.input.fwhmBroad[i], measures)
    w.floatArray(measures)
    if (fitsReal(measures)) { w.room(4); w.i32(-1) } else w.floatArray(measures, 8)
    w.room(8 + CODES_BYTES)
    w.i32(CODES_BYTES)
    w.bytes(codesOf(run.out, i, (l) => run.input.kind[l][i], codes))
    const mc = run.mc[i]
    if (mc) {
      w.floatArray(percentilesOf(mc, pct))
      w.floatArray(classFractionsOf(mc, cls))
    } else {
      w.room(8)
      w.i32(-1); w.i32(-1)
    }
    w.view.setUint32(lengthAt, w.at - lengthAt - 4)
  }
  // an own ArrayBuffer of the exact size, so it can be moved to the event loop rather than copied
  return w.buf.slice(0, w.at)
}

/** Encoded rows of consecutive galaxies (concatenated outputs of `encodeStoredRows`). */
export class StoredRows {
  private readonly parts: Uint8Array[]
  private readonly index: Array<{ part: number; at: number; len: number }> = []
  constructor(parts: Uint8Array[]) {
    this.parts = parts
    parts.forEach((p, part) => {
      const v = new DataView(p.buffer, p.byteOffset, p.byteLength)
      for (let at = 0; at < p.length;) {
        const len = v.getUint32(at)
        this.index.push({ part, at: at + 4, len })
        at += 4 + len
      }
    })
  }
  get length() { return this.index.length }

  /**
   * The binary COPY stream of rows from `start`, one per id (an undefined id: no row), under a
   * project and revision.
   */
  copyData(ids: ReadonlyArray<number | undefined>, start: number, projectId: string, revision: number, layoutId: number): Buffer {
    const head = new Writer(64)
    const uuid = Buffer.from(projectId.replace(/-/g, ''), 'hex')
    if (uuid.length !== 16) throw new Error('project id is no uuid')
    const version = Buffer.from(METHOD_VERSION, 'utf8')
    head.i32(16); head.bytes(uuid)
    head.i32(4); head.i32(revision)
    head.room(4 + version.length); head.i32(version.length); head.bytes(version)
    head.i32(2); head.i16(layoutId)
    const constants = head.buf.subarray(0, head.at)
    let size = 19 + 2
    for (let j = 0; j < ids.length; j++) if (ids[j] !== undefined) size += 2 + 12 + constants.length + this.index[start + j].len
    const out = Buffer.allocUnsafe(size)
    out.write('PGCOPY\n\xff\r\n\0', 0, 'latin1')
    out.writeInt32BE(0, 11) // flags
    out.writeInt32BE(0, 15) // header extension length
    let at = 19
    for (let j = 0; j < ids.length; j++) {
      const id = ids[j]
      if (id === undefined) continue
      const e = this.index[start + j]
      at = out.writeInt16BE(COPY_COLUMNS.length, at)
      at = out.writeInt32BE(8, at)
      at = out.writeBigInt64BE(BigInt(id), at)
      out.set(constants, at); at += constants.length
      out.set(this.parts[e.part].subarray(e.at, e.at + e.len), at); at += e.len
    }
    out.writeInt16BE(-1, at)
    return out
  }
}

/** The connection of a drizzle transaction (node-postgres), for COPY inside it. */
export function transactionClient(tx: Executor): pg.PoolClient | pg.Client {
  const client = (tx as unknown as { session?: { client?: unknown } }).session?.client as pg.PoolClient | undefined
  if (!client || typeof client.query !== 'function' || 'totalCount' in client) throw new Error('COPY needs the transaction\'s own connection')
  return client
}

/**
 * Stores results of the galaxies `ids` (one per encoded row from `start`; undefined: none) under a
 * revision, by COPY: the rows of that revision of the galaxies in `replace` are deleted first. The
 * caller holds the row locks of the galaxies (it wrote them, or locked them), so no other writer
 * stores a result of theirs between the delete and the COPY.
 */
export async function storeResults(tx: Executor, at: { projectId: string; revision: number; layoutId: number }, rows: StoredRows,
  ids: ReadonlyArray<number | undefined>, start: number, replace: readonly number[]) {
  if (!ids.some((id) => id !== undefined)) return
  if (replace.length) await tx.execute(sql`delete from results where revision = ${at.revision} and galaxy_id = any(${'{' + replace.join(',') + '}'}::bigint[])`)
  const data = rows.copyData(ids, start, at.projectId, at.revision, at.layoutId)
  await pipeline(Readable.from([data]), transactionClient(tx).query(copyFrom(`copy results (${COPY_COLUMNS.join(', ')}) from stdin with (format binary)`)))
}

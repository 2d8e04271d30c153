import { gzipSync } from 'node:zlib'
import { encodeDiagramColumns, typedColumns, type DiagramColumnsJson } from '../../shared/diagram-columns.ts'

/** A diagram document in the forms it is sent in, each made once. */
export interface DiagramDocument { body: Buffer; etag: string; gzipped?: Buffer; binary?: Buffer; binaryGzipped?: Buffer }

/** The gzip form of a cached document, made once on first demand (about a quarter of the size). */
export function gzippedDiagram(doc: DiagramDocument): Buffer {
  return (doc.gzipped ??= gzipSync(doc.body, { level: 6 }))
}

/** The binary form (shared/diagram-columns.ts) of a cached document, made once on first demand. */
export function binaryDiagram(doc: DiagramDocument, gzip: boolean): Buffer {
  doc.binary ??= Buffer.from(encodeDiagramColumns(typedColumns(JSON.parse(doc.body.toString('utf8')) as DiagramColumnsJson)))
  return gzip ? (doc.binaryGzipped ??= gzipSync(doc.binary, { level: 6 })) : doc.binary
}

/**
 * One app's diagram documents and its warm-up after writes: a least-recently-used cache (each
 * document up to a few tens of MB for 10⁶ galaxies), the builds in flight, the writes in flight
 * and the warm-up timers per project. Made per app and passed through AppDeps (server/app.ts),
 * never held at module level, so two apps in one process keep theirs apart.
 */
export class DiagramCache {
  private readonly docs = new Map<string, DiagramDocument>()
  private readonly building = new Map<string, Promise<DiagramDocument>>()
  private readonly timers = new Map<string, NodeJS.Timeout>()
  private readonly writes = new Map<string, number>()

  /**
   * @param warmupMs how long writes to a project must pause before `warm` runs; 0 = never (DIAGRAM_WARMUP_MS)
   * @param entries documents kept
   */
  constructor(readonly warmupMs: number, readonly entries = 8) {}

  /** The document cached under `key` (now the most recent), else `build`'s; concurrent misses share one build. */
  async get(key: string, build: () => Promise<DiagramDocument>): Promise<DiagramDocument> {
    const hit = this.docs.get(key)
    if (hit !== undefined) { this.docs.delete(key); this.docs.set(key, hit); return hit }
    const pending = this.building.get(key)
    if (pending) return pending
    const made = build().then((doc) => {
      this.docs.set(key, doc)
      while (this.docs.size > this.entries) this.docs.delete(this.docs.keys().next().value!)
      return doc
    }).finally(() => this.building.delete(key))
    this.building.set(key, made)
    return made
  }

  /**
   * Arms the warm-up of a project: `warm` runs once writes to it have paused for `warmupMs`. Re-armed
   * by every write, so a bulk ingestion of many batches warms once, at the end; a write still running
   * arms it again when it ends. A failed warm-up only means the next reader builds the document.
   */
  warmSoon(projectId: string, warm: () => Promise<unknown>) {
    if (this.warmupMs <= 0) return
    clearTimeout(this.timers.get(projectId))
    if (this.writes.get(projectId)) return
    const timer = setTimeout(() => {
      this.timers.delete(projectId)
      warm().catch(() => {})
    }, this.warmupMs)
    timer.unref()
    this.timers.set(projectId, timer)
  }

  /**
   * Runs a write to a project's galaxies; once no write to it is left running, the warm-up is armed.
   * A pipeline keeping two batches in flight thus gets one rebuild at the end, not one in every
   * pause between batches (each costs seconds of CPU).
   */
  async writing<T>(projectId: string, write: () => Promise<T>, warm: () => Promise<unknown>): Promise<T> {
    this.writes.set(projectId, (this.writes.get(projectId) ?? 0) + 1)
    clearTimeout(this.timers.get(projectId))
    try {
      return await write()
    } finally {
      const left = (this.writes.get(projectId) ?? 1) - 1
      if (left > 0) this.writes.set(projectId, left)
      else this.writes.delete(projectId)
      this.warmSoon(projectId, warm)
    }
  }

  /** Stops the warm-up timers (the app is stopping). */
  close() {
    for (const t of this.timers.values()) clearTimeout(t)
    this.timers.clear()
  }
}

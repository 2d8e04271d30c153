import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { randomBytes } from 'node:crypto'
import { availableParallelism } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { DEFAULT_ANON_COMPUTE_BUDGET, DEFAULT_COMPUTE_BUDGET } from './compute/budget.ts'

export const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..')

export interface Config {
  port: number
  host: string
  production: boolean
  databaseUrl: string | undefined
  smtpUrl: string | undefined
  jwtSecret: string
  dataDir: string
  uploadLimitBytes: number
  embeddedPgPort: number
  appUrl: string
  /** Secure cookies only when served over HTTPS (behind a proxy that says so). */
  secureCookies: boolean
  /** Requests per minute per address on sign-in / sign-up / reset. */
  authRateLimit: number
  /** Intakes at least this large mail their starter when they finish. */
  largeIntakeRows: number
  /** pause after the last write before the diagram document is rebuilt in the background (0 = off) */
  diagramWarmupMs: number
  /** staged CSV uploads older than this are closed and their files removed (0 = keep) */
  stagedIntakeHours: number
  /** API requests per minute per key, user or address; anonymous diagnostics per address. */
  apiRateLimit: number
  anonymousDiagnosticsRateLimit: number
  /** compute worker threads (default: cores − 1, at least 1) */
  computeThreads: number
  /** chunks waiting for a thread before requests are refused with 503 */
  computeQueue: number
  /** a request's computation (or a background chunk) running longer than this is stopped */
  computeTimeoutMs: number
  /** per-request compute units, galaxies × (draws + 10): with credentials, and without */
  computeBudget: number
  anonymousComputeBudget: number
}

function positiveInteger(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name]
  if (raw === undefined || raw === '') return fallback
  const v = Number(raw)
  if (!Number.isInteger(v) || v < 1) throw new Error(`${name} must be a positive integer, got ${raw}`)
  return v
}

function readOrCreateSecret(dataDir: string): string {
  const file = join(dataDir, 'jwt-secret')
  if (!existsSync(file)) {
    mkdirSync(dataDir, { recursive: true })
    writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 })
  }
  return readFileSync(file, 'utf8').trim()
}

/** Reads the environment once; throws for settings that would be unsafe. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const production = env.NODE_ENV === 'production'
  const dataDir = resolve(env.DATA_DIR ?? join(PROJECT_ROOT, '.data'))
  if (production && !env.JWT_SECRET) {
    throw new Error('JWT_SECRET must be set when NODE_ENV=production (refusing to start)')
  }
  const port = Number(env.PORT ?? 8080)
  if (!Number.isInteger(port) || port < 0 || port > 65535) throw new Error(`PORT must be a port number, got ${env.PORT}`)
  const host = env.HOST ?? '127.0.0.1'
  return {
    port,
    host,
    production,
    databaseUrl: env.DATABASE_URL || undefined,
    smtpUrl: env.SMTP_URL || undefined,
    jwtSecret: env.JWT_SECRET ?? readOrCreateSecret(dataDir),
    dataDir,
    uploadLimitBytes: Number(env.UPLOAD_LIMIT_MB ?? 50) * 1024 * 1024,
    embeddedPgPort: Number(env.EMBEDDED_PG_PORT ?? 54329),
    appUrl: (env.APP_URL ?? `http://${host}:${port}`).replace(/\/$/, ''),
    secureCookies: env.SECURE_COOKIES === '1' || (env.APP_URL ?? '').startsWith('https:'),
    authRateLimit: Number(env.AUTH_RATE_LIMIT ?? 20),
    largeIntakeRows: Number(env.LARGE_INTAKE_ROWS ?? 5000),
    diagramWarmupMs: Number(env.DIAGRAM_WARMUP_MS ?? 1500),
    stagedIntakeHours: Number(env.STAGED_INTAKE_HOURS ?? 24),
    apiRateLimit: Number(env.API_RATE_LIMIT ?? 1200),
    anonymousDiagnosticsRateLimit: Number(env.DIAGNOSTICS_ANON_RATE_LIMIT ?? 600),
    computeThreads: positiveInteger(env, 'COMPUTE_THREADS', Math.max(1, availableParallelism() - 1)),
    computeQueue: positiveInteger(env, 'COMPUTE_QUEUE', 256),
    computeTimeoutMs: positiveInteger(env, 'COMPUTE_TIMEOUT_S', 60) * 1000,
    computeBudget: positiveInteger(env, 'COMPUTE_BUDGET', DEFAULT_COMPUTE_BUDGET),
    anonymousComputeBudget: positiveInteger(env, 'COMPUTE_ANON_BUDGET', DEFAULT_ANON_COMPUTE_BUDGET),
  }
}

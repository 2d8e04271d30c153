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
  /** EMBEDDED_PG_PORT when set (then exactly that port); unset → 54329, or a free port when taken */
  embeddedPgPort: number | undefined
  appUrl: string
  /** Secure cookies and HSTS always (SECURE_COOKIES=1 or an https APP_URL); otherwise per request over TLS. */
  secureCookies: boolean
  /**
   * Express "trust proxy": which peers may set X-Forwarded-For/-Proto. Off by default, so a client
   * cannot pick its own address for the rate limits; a hop count or addresses/subnets when behind a proxy.
   */
  trustProxy: false | number | string[]
  /** Requests per minute per address on sign-in / sign-up / reset. */
  authRateLimit: number
  /** Intakes at least this large mail their starter when they finish. */
  largeIntakeRows: number
  /** pause after the last write before the diagram document is rebuilt in the background (0 = off) */
  diagramWarmupMs: number
  /** staged CSV uploads older than this are closed and their files removed (0 = keep) */
  stagedIntakeHours: number
  /** most data rows one CSV may have (refused at upload, 413) */
  intakeMaxRows: number
  /** CSV commits up to this many rows finish inside the request (200); larger ones run as a job (202) */
  intakeInlineRows: number
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

/** TRUST_PROXY: unset/0/false/off → trust no proxy; a number → that many hops; else a comma list (loopback, 10.0.0.0/8, …). */
export function parseTrustProxy(value: string | undefined): Config['trustProxy'] {
  const v = (value ?? '').trim()
  if (v === '' || /^(0|false|off|no)$/i.test(v)) return false
  if (/^\d+$/.test(v)) return Number(v)
  if (/^(true|on|yes|all)$/i.test(v)) throw new Error('TRUST_PROXY=true would let any client choose its address; give the hop count or the proxy addresses')
  return v.split(',').map((s) => s.trim()).filter(Boolean)
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
  const embeddedPgPort = env.EMBEDDED_PG_PORT ? Number(env.EMBEDDED_PG_PORT) : undefined
  if (embeddedPgPort !== undefined && (!Number.isInteger(embeddedPgPort) || embeddedPgPort < 1 || embeddedPgPort > 65535)) {
    throw new Error(`EMBEDDED_PG_PORT must be a port number, got ${env.EMBEDDED_PG_PORT}`)
  }
  return {
    port,
    host,
    production,
    databaseUrl: env.DATABASE_URL || undefined,
    smtpUrl: env.SMTP_URL || undefined,
    jwtSecret: env.JWT_SECRET ?? readOrCreateSecret(dataDir),
    dataDir,
    uploadLimitBytes: Number(env.UPLOAD_LIMIT_MB ?? 50) * 1024 * 1024,
    embeddedPgPort,
    appUrl: (env.APP_URL ?? `http://${host}:${port}`).replace(/\/$/, ''),
    secureCookies: env.SECURE_COOKIES === '1' || (env.APP_URL ?? '').startsWith('https:'),
    trustProxy: parseTrustProxy(env.TRUST_PROXY),
    authRateLimit: Number(env.AUTH_RATE_LIMIT ?? 20),
    largeIntakeRows: Number(env.LARGE_INTAKE_ROWS ?? 5000),
    diagramWarmupMs: Number(env.DIAGRAM_WARMUP_MS ?? 1500),
    stagedIntakeHours: Number(env.STAGED_INTAKE_HOURS ?? 24),
    intakeMaxRows: Number(env.INTAKE_MAX_ROWS ?? 1_000_000),
    intakeInlineRows: Number(env.INTAKE_INLINE_ROWS ?? 10_000),
    apiRateLimit: Number(env.API_RATE_LIMIT ?? 1200),
    anonymousDiagnosticsRateLimit: Number(env.DIAGNOSTICS_ANON_RATE_LIMIT ?? 600),
    computeThreads: positiveInteger(env, 'COMPUTE_THREADS', Math.max(1, availableParallelism() - 1)),
    computeQueue: positiveInteger(env, 'COMPUTE_QUEUE', 256),
    computeTimeoutMs: positiveInteger(env, 'COMPUTE_TIMEOUT_S', 60) * 1000,
    computeBudget: positiveInteger(env, 'COMPUTE_BUDGET', DEFAULT_COMPUTE_BUDGET),
    anonymousComputeBudget: positiveInteger(env, 'COMPUTE_ANON_BUDGET', DEFAULT_ANON_COMPUTE_BUDGET),
  }
}

import { describe, expect, it } from 'vitest'
import { loadConfig } from '../../server/config.ts'

// Only the variables under test plus a secret (so nothing is written to DATA_DIR).
const base = { JWT_SECRET: 'config-test' }
const load = (env: Record<string, string | undefined>) => loadConfig({ ...base, ...env })
/** The message loadConfig refuses start-up with (one Error naming every bad variable). */
function refusal(env: Record<string, string | undefined>): string {
  try {
    load(env)
  } catch (e) {
    return (e as Error).message
  }
  throw new Error(`expected ${JSON.stringify(env)} to be refused`)
}

describe('loadConfig: the environment through one zod schema', () => {
  it('keeps every default when nothing is set (empty counts as unset)', () => {
    const c = load({ PORT: '', UPLOAD_LIMIT_MB: '' })
    expect(c).toMatchObject({
      port: 8080, host: '127.0.0.1', production: false, databaseUrl: undefined, smtpUrl: undefined,
      jwtSecret: 'config-test', uploadLimitBytes: 50 * 1024 * 1024, embeddedPgPort: undefined,
      appUrl: 'http://127.0.0.1:8080', secureCookies: false, trustProxy: false, authRateLimit: 20,
      largeIntakeRows: 5000, diagramWarmupMs: 1500, stagedIntakeHours: 24, intakeMaxRows: 1_000_000,
      intakeInlineRows: 10_000, apiRateLimit: 1200, anonymousDiagnosticsRateLimit: 600, computeQueue: 256,
      computeTimeoutMs: 60_000, computeBudget: 2_500_000, anonymousComputeBudget: 200_000, mailCatcherPort: 0,
    })
    expect(c.computeThreads).toBeGreaterThanOrEqual(1)
  })

  it('reads good values of every kind', () => {
    const c = load({
      PORT: '0', HOST: '0.0.0.0', UPLOAD_LIMIT_MB: '2', EMBEDDED_PG_PORT: '55432', DIAGRAM_WARMUP_MS: '0',
      STAGED_INTAKE_HOURS: '0', INTAKE_INLINE_ROWS: '0', COMPUTE_THREADS: ' 3 ', COMPUTE_TIMEOUT_S: '2',
      DATABASE_URL: 'postgresql://u:p@db:5432/rg', SMTP_URL: 'smtps://relay:465', APP_URL: 'https://rg.example.org/',
      TRUST_PROXY: 'loopback, 10.0.0.0/8, ::1, 2001:db8::/32',
    })
    expect(c).toMatchObject({
      port: 0, host: '0.0.0.0', uploadLimitBytes: 2 * 1024 * 1024, embeddedPgPort: 55432, diagramWarmupMs: 0,
      stagedIntakeHours: 0, intakeInlineRows: 0, computeThreads: 3, computeTimeoutMs: 2000,
      databaseUrl: 'postgresql://u:p@db:5432/rg', smtpUrl: 'smtps://relay:465', appUrl: 'https://rg.example.org',
      secureCookies: true, trustProxy: ['loopback', '10.0.0.0/8', '::1', '2001:db8::/32'],
    })
    expect(load({ TRUST_PROXY: '2' }).trustProxy).toBe(2)
    // the boolean words of SECURE_COOKIES, in any case: a false one trusts no proxy
    for (const v of ['off', 'No', 'FALSE', '0']) expect(load({ TRUST_PROXY: v }).trustProxy).toBe(false)
    expect(load({ MAIL_CATCHER_PORT: '2525' }).mailCatcherPort).toBe(2525)
    // read elsewhere (cli/start.ts), validated here
    expect(() => load({ SEED_DEMO: '0', BUILD_CLIENT: '1' })).not.toThrow()
  })

  it('reads SECURE_COOKIES as a boolean word', () => {
    for (const v of ['1', 'true', 'YES', 'on']) expect(load({ SECURE_COOKIES: v }).secureCookies).toBe(true)
    for (const v of ['0', 'false', 'no', 'Off']) expect(load({ SECURE_COOKIES: v }).secureCookies).toBe(false)
    // an https APP_URL turns them on regardless
    expect(load({ SECURE_COOKIES: '0', APP_URL: 'https://rg.example.org' }).secureCookies).toBe(true)
  })

  it.each([
    [{ PORT: 'abc' }, 'PORT must be a port number (a whole number from 0 to 65535), got "abc"'],
    [{ PORT: '65536' }, 'PORT must be a port number (a whole number from 0 to 65535), got "65536"'],
    [{ EMBEDDED_PG_PORT: '0' }, 'EMBEDDED_PG_PORT must be a port number (a whole number from 1 to 65535), got "0"'],
    [{ UPLOAD_LIMIT_MB: '-5' }, 'UPLOAD_LIMIT_MB must be a whole number ≥ 1, got "-5"'],
    [{ COMPUTE_THREADS: '1.5' }, 'COMPUTE_THREADS must be a whole number ≥ 1, got "1.5"'],
    [{ COMPUTE_QUEUE: '0' }, 'COMPUTE_QUEUE must be a whole number ≥ 1, got "0"'],
    [{ DIAGRAM_WARMUP_MS: '1e3' }, 'DIAGRAM_WARMUP_MS must be a whole number ≥ 0, got "1e3"'],
    [{ AUTH_RATE_LIMIT: 'lots' }, 'AUTH_RATE_LIMIT must be a whole number ≥ 1, got "lots"'],
    [{ INTAKE_MAX_ROWS: '99999999999999999999' }, 'INTAKE_MAX_ROWS must be a whole number ≥ 1, got "99999999999999999999"'],
    [{ SECURE_COOKIES: 'maybe' }, 'SECURE_COOKIES must be 1/true/yes/on or 0/false/no/off, got "maybe"'],
    [{ APP_URL: 'rg.example.org' }, 'APP_URL must be a URL with http:// or https:// (e.g. https://ratiograph.example.org), got "rg.example.org"'],
    [{ DATABASE_URL: 'mysql://db/rg' }, 'DATABASE_URL must be a URL with postgres:// or postgresql://'],
    [{ SMTP_URL: 'relay:587' }, 'SMTP_URL must be a URL with smtp:// or smtps://'],
    [{ MAIL_CATCHER_PORT: '2525x' }, 'MAIL_CATCHER_PORT must be a port number (a whole number from 0 to 65535), got "2525x"'],
    [{ SEED_DEMO: 'no' }, 'SEED_DEMO must be 0 or 1, got "no"'],
    [{ TRUST_PROXY: 'true' }, 'TRUST_PROXY must not be true: that would let any client choose its address'],
    [{ TRUST_PROXY: 'Yes' }, 'TRUST_PROXY must not be true: that would let any client choose its address'],
    [{ TRUST_PROXY: 'all' }, 'TRUST_PROXY must not be true: that would let any client choose its address'],
    [{ SECURE_COOKIES: 'constructor' }, 'SECURE_COOKIES must be 1/true/yes/on or 0/false/no/off, got "constructor"'],
    [{ TRUST_PROXY: 'loopback, 10.0.0.0/33, proxy.local' }, 'TRUST_PROXY must be a hop count or a comma list of addresses, subnets (10.0.0.0/8) or loopback/linklocal/uniquelocal; not "10.0.0.0/33", "proxy.local"'],
  ])('refuses %o with a message naming the variable and the rule', (env, message) => {
    const m = refusal(env)
    expect(m).toMatch(/^Invalid environment \(refusing to start\):\n {2}/)
    expect(m).toContain(message)
    expect(m.split('\n')).toHaveLength(2) // one line per bad variable
  })

  it('names every bad variable in the one message', () => {
    expect(refusal({ PORT: 'abc', UPLOAD_LIMIT_MB: '-5', COMPUTE_THREADS: '1.5' }).split('\n')).toEqual([
      'Invalid environment (refusing to start):',
      '  PORT must be a port number (a whole number from 0 to 65535), got "abc"',
      '  UPLOAD_LIMIT_MB must be a whole number ≥ 1, got "-5"',
      '  COMPUTE_THREADS must be a whole number ≥ 1, got "1.5"',
    ])
  })

  it('keeps the production rule: no JWT_SECRET, no start', () => {
    expect(() => loadConfig({ NODE_ENV: 'production' })).toThrow('JWT_SECRET must be set when NODE_ENV=production (refusing to start)')
    expect(() => loadConfig({ NODE_ENV: 'production', JWT_SECRET: '' })).toThrow(/JWT_SECRET must be set/)
    expect(loadConfig({ NODE_ENV: 'production', JWT_SECRET: 's3cret' })).toMatchObject({ production: true, jwtSecret: 's3cret' })
  })
})

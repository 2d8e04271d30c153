import { mkdtempSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../../server/config.ts'
import { freePort, startEmbeddedPostgres } from '../../server/db/embedded-postgres.ts'
import { startRuntime } from '../../server/runtime.ts'
import { outboxMessages } from '../../server/db/schema.ts'
import { eq } from 'drizzle-orm'
import { tokenIn, waitForMail } from '../helpers/app.ts'

/** A benchmark's own PostgreSQL (durability defaults on, as in production) and server on loopback. */
export async function benchServer(extraEnv: Record<string, string> = {}) {
  const dir = mkdtempSync(join(PROJECT_ROOT, '.pg-bench-'))
  const pg = await startEmbeddedPostgres({ dir, port: await freePort(), durable: true })
  const rt = await startRuntime({
    env: { ...process.env, DATABASE_URL: pg.url, PORT: String(await freePort()), JWT_SECRET: 'bench', LOG_LEVEL: 'silent', AUTH_RATE_LIMIT: '100000', API_RATE_LIMIT: '10000000', DIAGNOSTICS_ANON_RATE_LIMIT: '10000000', ...extraEnv },
    log: () => {}, serveClient: true,
  })
  const account = { email: 'bench@example.org', password: 'benchmark password', name: 'Bench' }
  const json = { 'content-type': 'application/json' }
  await fetch(`${rt.url}/api/v1/auth/sign-up`, { method: 'POST', headers: json, body: JSON.stringify(account) })
  const res = await fetch(`${rt.url}/api/v1/auth/sign-in`, { method: 'POST', headers: json, body: JSON.stringify({ email: account.email, password: account.password }) })
  const cookies = res.headers.getSetCookie().map((c) => c.split(';')[0])
  const csrf = decodeURIComponent(cookies.find((c) => c.startsWith('rg_csrf='))!.split('=')[1])
  const session = { cookie: cookies.join('; '), 'x-csrf-token': csrf, 'content-type': 'application/json' }
  // API keys need the verified address: follow the link the mail catcher caught
  const mails = () => rt.db.select().from(outboxMessages).where(eq(outboxMessages.toAddress, account.email))
  const verifyMail = await waitForMail(mails, (m) => m.text.includes('/verify-email?token='))
  await fetch(`${rt.url}/api/v1/auth/verify-email`, { method: 'POST', headers: session, body: JSON.stringify({ token: tokenIn(verifyMail.text, '/verify-email') }) })
  const project = await (await fetch(`${rt.url}/api/v1/projects`, { method: 'POST', headers: session, body: JSON.stringify({ name: 'bench' }) })).json()
  const key = (await (await fetch(`${rt.url}/api/v1/me/api-keys`, { method: 'POST', headers: session, body: JSON.stringify({ name: 'bench', access: 'write' }) })).json()).key as string
  return {
    rt, pg, projectId: project.id as string, key,
    async close() { await rt.stop(); pg.stop(); rmSync(pg.dir, { recursive: true, force: true }); rmSync(dir, { recursive: true, force: true }) },
  }
}

/** Posts `n` invented Lantern-style galaxies to the bench project in batches of 10,000. */
export async function loadGalaxies(env: Awaited<ReturnType<typeof benchServer>>, n: number, seed: number) {
  const { generateLanternSurvey } = await import('../../server/seed/lantern.ts')
  const galaxies = generateLanternSurvey(n, seed).map(({ population: _p, ...g }) => g)
  for (let i = 0; i < n; i += 10_000) {
    const res = await fetch(`${env.rt.url}/api/v1/projects/${env.projectId}/galaxies/batch`, {
      method: 'POST', headers: { authorization: `Bearer ${env.key}`, 'content-type': 'application/json' }, body: JSON.stringify({ galaxies: galaxies.slice(i, i + 10_000) }),
    })
    if (!res.ok) throw new Error(`loading galaxies: ${res.status} ${await res.text()}`)
  }
  return galaxies
}

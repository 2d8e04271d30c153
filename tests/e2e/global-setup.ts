import type { TestProject } from 'vitest/node'
import { buildClientIfStale, startRuntime, type Runtime } from '../../server/runtime.ts'
import { freshDatabaseUrl } from '../helpers/db.ts'

declare module 'vitest' {
  interface ProvidedContext { baseUrl: string; databaseUrl: string }
}

let rt: Runtime | undefined

/** The built client served by the real server on a fresh database with the demo seed (without its spectra). */
export async function setup(project: TestProject) {
  buildClientIfStale((m) => console.log(m))
  const databaseUrl = await freshDatabaseUrl()
  rt = await startRuntime({
    env: { ...process.env, DATABASE_URL: databaseUrl, PORT: '0', JWT_SECRET: 'e2e-secret', AUTH_RATE_LIMIT: '1000', LOG_LEVEL: 'silent' },
    // the invented spectra's background fit would rewrite 300 demo galaxies while the journeys read them
    seed: { spectra: false }, serveClient: true, log: () => {},
  })
  project.provide('baseUrl', rt.url)
  project.provide('databaseUrl', databaseUrl)
}

export async function teardown() { await rt?.stop() }

// `npm test`: a throwaway PostgreSQL on loopback, migrations into a template database, every vitest
// project (science, unit, api, system, e2e), then the plain "N passed, N failed" line and a clean stop.
import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../server/config.ts'
import { clusterDirOf, freePort, startEmbeddedPostgres, stopClusterAt } from '../server/db/embedded-postgres.ts'
import { connect, runMigrations } from '../server/db/client.ts'

// as root in a private folder the cluster itself is kept in a postgres-owned temporary folder (pg.dir)
const dir = join(PROJECT_ROOT, `.pg-test-${process.pid}`)
const pg = await startEmbeddedPostgres({ dir, defaultPort: await freePort(), durable: false, createdb: true, database: 'ratiograph_template', log: (m) => console.log(m) })
  .catch((err) => { stopClusterAt(dir); rmSync(clusterDirOf(dir), { recursive: true, force: true }); rmSync(dir, { recursive: true, force: true }); throw err })
let code = 1
// Ctrl-C reaches vitest too (same process group): let it end, then stop and remove the cluster
let interrupted = false
process.on('SIGINT', () => { interrupted = true })
try {
  const db = connect(pg.url, 2)
  await runMigrations(db)
  await db.$client.end()
  if (interrupted) throw new Error('interrupted')
  const out = join(PROJECT_ROOT, 'tests', '.output')
  mkdirSync(out, { recursive: true })
  const report = join(out, 'vitest.json')
  rmSync(report, { force: true })
  const r = spawnSync(process.execPath, [join(PROJECT_ROOT, 'node_modules', 'vitest', 'vitest.mjs'), 'run',
    '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...process.argv.slice(2)], {
    cwd: PROJECT_ROOT, stdio: 'inherit',
    env: { ...process.env, TEST_TEMPLATE_URL: pg.url, NODE_ENV: 'test', DATA_DIR: join(dir, 'app-data') },
  })
  let passed = 0, failed = 0, skipped = 0
  if (existsSync(report)) {
    const j = JSON.parse(readFileSync(report, 'utf8'))
    passed = j.numPassedTests; failed = j.numFailedTests + (j.numRuntimeErrorTestSuites ?? 0); skipped = j.numPendingTests + (j.numTodoTests ?? 0)
  } else failed = 1
  code = r.status === 0 && failed === 0 ? 0 : 1
  if (code !== 0 && failed === 0) failed = 1 // vitest failed outside any test (an unhandled error): count it
  console.log(`\n${passed} passed, ${failed} failed, ${skipped} skipped`)
} finally {
  pg.stop()
  rmSync(pg.dir, { recursive: true, force: true })
  rmSync(dir, { recursive: true, force: true })
}
process.exit(code)

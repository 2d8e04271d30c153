import { afterAll, describe, expect, it } from 'vitest'
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { chmodSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../../server/config.ts'
import { CLUSTER_POINTER, RELOCATED_CLUSTERS, freePort, portIsFree } from '../../server/db/embedded-postgres.ts'

/**
 * The README's commands as a newcomer runs them as root: a clone in a private folder (root's home is
 * 0700, so is `mktemp -d`), where the `postgres` user cannot reach `.data/pg`. The clone is of this
 * repository's HEAD (commit first); node_modules is linked from here instead of `npm install`.
 */
const isRoot = process.getuid?.() === 0
const git = spawnSync('git', ['-C', PROJECT_ROOT, 'rev-parse', 'HEAD'], { encoding: 'utf8' })
const inGit = git.status === 0
const why = !isRoot ? 'it needs root (PostgreSQL runs as the postgres user only then)' : !inGit ? 'the project is not a git checkout' : ''
if (why) console.warn(`skipped: the fresh-clone start test — ${why}`)

let home = ''
let clone = ''
const clusters: string[] = []
const children: ChildProcess[] = []
afterAll(() => {
  for (const c of children) if (c.exitCode === null && c.signalCode === null && c.pid) { try { process.kill(-c.pid, 'SIGKILL') } catch { /* gone */ } }
  for (const dir of clusters) {
    // a cluster a failed run left running is stopped by its own postmaster.pid, then removed
    if (existsSync(join(dir, 'data', 'postmaster.pid'))) {
      const bin = spawnSync('bash', ['-c', 'ls -d /usr/lib/postgresql/*/bin | sort -V | tail -1'], { encoding: 'utf8' }).stdout.trim()
      spawnSync('runuser', ['-u', 'postgres', '--', `${bin}/pg_ctl`, '-D', join(dir, 'data'), '-m', 'immediate', '-w', 'stop'], { cwd: '/' })
    }
    rmSync(dir, { recursive: true, force: true })
  }
  if (home) rmSync(home, { recursive: true, force: true })
})

/** The environment of a newcomer's shell: nothing of this test run's database, data folder or ports. */
function newcomerEnv(extra: Record<string, string>): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = { ...process.env, ...extra }
  for (const k of Object.keys(env)) {
    if (/^(VITEST|TEST_|npm_)/.test(k) || ['DATA_DIR', 'DATABASE_URL', 'EMBEDDED_PG_PORT', 'NODE_ENV', 'JWT_SECRET', 'SMTP_URL',
      'MAIL_CATCHER_PORT', 'PORT', 'HOST', 'APP_URL', 'NODE_OPTIONS'].includes(k)) delete env[k]
  }
  return { ...env, ...extra }
}

/** Runs `npm …` in the clone in its own process group (as a terminal would), collecting its output. */
function npm(args: string[], env: NodeJS.ProcessEnv) {
  const child = spawn('npm', args, { cwd: clone, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] })
  children.push(child)
  let out = ''
  child.stdout!.on('data', (b) => { out += b })
  child.stderr!.on('data', (b) => { out += b })
  const exited = new Promise<number | null>((ok) => child.on('exit', (code) => ok(code)))
  return { child, exited, output: () => out }
}

const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))

describe.skipIf(!!why)('a fresh clone in a private folder, as root', () => {
  it('clones into a 0700 folder', () => {
    home = mkdtempSync(join(tmpdir(), 'rg-fresh-'))
    chmodSync(home, 0o700)
    clone = join(home, 'ratiograph')
    // a repository owned by another user would otherwise be refused ("dubious ownership")
    const r = spawnSync('git', ['-c', 'safe.directory=*', 'clone', '-q', PROJECT_ROOT, clone], { encoding: 'utf8' })
    expect(r.stderr).toBe('')
    expect(r.status).toBe(0)
    symlinkSync(join(PROJECT_ROOT, 'node_modules'), join(clone, 'node_modules'), 'dir')
    expect(spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-x', clone]).status).not.toBe(0)
  })

  it('npm start answers /api/health, and Ctrl-C stops the server and its relocated cluster cleanly', async () => {
    const port = await freePort()
    // the client build is left out (minutes on two cores; dist/ has its own tests); the demo seed stays in
    const run = npm(['start'], newcomerEnv({ PORT: String(port), BUILD_CLIENT: '0', CI: 'true' }))
    let health = 0
    for (let i = 0; i < 180 && health !== 200 && run.child.exitCode === null; i++) {
      await sleep(500)
      health = await fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.status, () => 0)
    }
    expect(run.output()).not.toContain('could not start')
    expect(health).toBe(200)

    const out = run.output()
    const located = /the cluster lives in (\S+) /.exec(out)
    expect(located, out).not.toBeNull()
    const clusterDir = located![1]
    clusters.push(clusterDir)
    expect(clusterDir.startsWith(`${RELOCATED_CLUSTERS}/`)).toBe(true)
    expect(readFileSync(join(clone, '.data', 'pg', CLUSTER_POINTER), 'utf8').trim()).toBe(clusterDir)
    const pgPort = Number(/embedded PostgreSQL on 127\.0\.0\.1:(\d+) \(cluster in (\S+)\)/.exec(out)?.[1])
    expect(pgPort).toBeGreaterThan(0)
    expect(existsSync(join(clusterDir, 'data', 'postmaster.pid'))).toBe(true)

    process.kill(-run.child.pid!, 'SIGINT') // what Ctrl-C in a terminal does: the whole process group
    const done = await Promise.race([run.exited.then(() => true), sleep(60_000).then(() => false)])
    expect(done).toBe(true)
    expect(run.output()).toContain('stopped cleanly')
    expect(existsSync(join(clusterDir, 'data', 'postmaster.pid'))).toBe(false)
    expect(await portIsFree(pgPort)).toBe(true)
    expect(await portIsFree(port)).toBe(true)
  })

  it('npm test runs there and removes its throwaway cluster', async () => {
    const run = npm(['test', '--', '--project', 'api', 'tests/api/foundation.test.ts'], newcomerEnv({ CI: 'true' }))
    const code = await Promise.race([run.exited, sleep(180_000).then(() => 'timeout' as const)])
    const out = run.output()
    expect(Number(/\n(\d+) passed, 0 failed/.exec(out)?.[1]), out).toBeGreaterThan(0)
    expect(code).toBe(0)
    const located = /the cluster lives in (\S+) /.exec(out)
    expect(located, out).not.toBeNull()
    clusters.push(located![1])
    expect(located![1].startsWith(tmpdir())).toBe(true)
    expect(existsSync(located![1])).toBe(false)
    expect(readdirSync(clone).filter((f) => f.startsWith('.pg-test-'))).toEqual([])
  })
})

import { afterAll, describe, expect, it } from 'vitest'
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs'
import net from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import pg from 'pg'
import { PROJECT_ROOT, loadConfig } from '../../server/config.ts'
import { CLUSTER_POINTER, freePort, portIsFree, startEmbeddedPostgres, stopClusterAt, type EmbeddedPostgres } from '../../server/db/embedded-postgres.ts'
import { backupDatabase, restoreDatabase } from '../../server/db/backup.ts'

const isRoot = process.getuid?.() === 0
const cleanups: Array<() => void> = []
afterAll(() => { for (const c of cleanups.reverse()) c() })

function cluster(c: EmbeddedPostgres) {
  cleanups.push(() => { c.stop(); rmSync(c.dir, { recursive: true, force: true }) })
  return c
}

async function query(url: string, sql: string) {
  const client = new pg.Client({ connectionString: url })
  await client.connect()
  try { return (await client.query(sql)).rows } finally { await client.end() }
}

/** Holds a loopback port the way another checkout's database would. */
async function holdPort(): Promise<{ port: number; release: () => Promise<void> }> {
  const srv = net.createServer()
  await new Promise<void>((ok) => srv.listen(0, '127.0.0.1', ok))
  const port = (srv.address() as net.AddressInfo).port
  return { port, release: () => new Promise((ok) => srv.close(() => ok())) }
}

describe('the embedded PostgreSQL port', () => {
  it('EMBEDDED_PG_PORT unset leaves the choice to the cluster; set, it must be a port', () => {
    expect(loadConfig({ JWT_SECRET: 'x' }).embeddedPgPort).toBeUndefined()
    expect(loadConfig({ JWT_SECRET: 'x', EMBEDDED_PG_PORT: '55432' }).embeddedPgPort).toBe(55432)
    expect(() => loadConfig({ JWT_SECRET: 'x', EMBEDDED_PG_PORT: 'five' })).toThrow(/EMBEDDED_PG_PORT must be a port number/)
  })

  it('takes a free port when the default is taken, says so, and finds the cluster at that port again', async () => {
    const taken = await holdPort()
    cleanups.push(() => { void taken.release() })
    const dir = mkdtempSync(join(PROJECT_ROOT, '.pg-port-'))
    cleanups.push(() => rmSync(dir, { recursive: true, force: true }))
    const said: string[] = []
    const a = cluster(await startEmbeddedPostgres({ dir, defaultPort: taken.port, durable: false, log: (m) => said.push(m) }))
    expect(a.port).not.toBe(taken.port)
    expect(a.startedHere).toBe(true)
    expect(said.join('\n')).toContain(`port ${taken.port} is taken`)
    expect(said.join('\n')).toContain(`uses port ${a.port}`)
    expect(await query(a.url, 'select 1 as one')).toEqual([{ one: 1 }])

    // still running (an earlier run, or npm start beside db:backup): reused at its own port
    const again = await startEmbeddedPostgres({ dir, defaultPort: await freePort(), durable: false })
    expect([again.port, again.startedHere]).toEqual([a.port, false])

    // stopped and started again, even with the default free now: the port it had, so a restart finds it
    a.stop()
    await taken.release()
    const b = cluster(await startEmbeddedPostgres({ dir, defaultPort: taken.port, durable: false }))
    expect([b.port, b.startedHere]).toEqual([a.port, true])
    expect(readFileSync(join(b.dir, 'port'), 'utf8').trim()).toBe(String(a.port))
    expect(await query(b.url, 'select 2 as two')).toEqual([{ two: 2 }])
    b.stop()
  })

  it('a taken EMBEDDED_PG_PORT is a clear error, not another port', async () => {
    const taken = await holdPort()
    cleanups.push(() => { void taken.release() })
    const dir = mkdtempSync(join(PROJECT_ROOT, '.pg-port-'))
    cleanups.push(() => rmSync(dir, { recursive: true, force: true }))
    await expect(startEmbeddedPostgres({ dir, port: taken.port, durable: false }))
      .rejects.toThrow(new RegExp(`port ${taken.port} for the embedded PostgreSQL is already in use.*EMBEDDED_PG_PORT`))
  })
})

describe.skipIf(!isRoot)('as root, a cluster asked for in a private folder', () => {
  it('lives in a postgres-owned folder elsewhere, named in the requested one; the private folder stays private', async () => {
    const home = mkdtempSync(join(tmpdir(), 'rg-private-')) // 0700, like root's home or `mktemp -d`
    cleanups.push(() => rmSync(home, { recursive: true, force: true }))
    const requested = join(home, 'clone', '.data', 'pg')
    const said: string[] = []
    const c = cluster(await startEmbeddedPostgres({ dir: requested, durable: false, log: (m) => said.push(m) }))
    expect(c.relocatedFrom).toBe(requested)
    expect(c.dir.startsWith(home)).toBe(false)
    expect(readFileSync(join(requested, CLUSTER_POINTER), 'utf8').trim()).toBe(c.dir)
    expect(said.join('\n')).toContain(`the cluster lives in ${c.dir}`)
    const pgUid = Number(spawnSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).stdout.trim())
    expect([statSync(c.dir).uid, statSync(c.dir).mode & 0o777]).toEqual([pgUid, 0o700])
    expect(statSync(home).mode & 0o777).toBe(0o700)
    expect(spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-x', home]).status).not.toBe(0)

    // backups and restores reach it through its URL; the archive lands in the private folder
    await query(c.url, 'create table kept (v int); insert into kept values (42)')
    const file = join(home, 'backup.dump')
    backupDatabase(c.url, file)
    expect(statSync(file).mode & 0o777).toBe(0o600)
    await query(c.url, 'drop table kept')
    restoreDatabase(c.url, file)
    expect(await query(c.url, 'select v from kept')).toEqual([{ v: 42 }])

    // started again from the same request: the same cluster, with its data
    const again = await startEmbeddedPostgres({ dir: requested, durable: false })
    expect([again.dir, again.startedHere]).toEqual([c.dir, false])

    // stopping by the requested folder follows the pointer
    stopClusterAt(requested)
    expect(existsSync(join(c.dir, 'data', 'postmaster.pid'))).toBe(false)
    expect(await portIsFree(c.port)).toBe(true)
  })
})
if (!isRoot) console.warn('skipped: the private-folder cluster test needs root (postgres runs as the postgres user only then)')

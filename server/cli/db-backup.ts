import { mkdirSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { loadConfig } from '../config.ts'
import { startEmbeddedPostgres } from '../db/embedded-postgres.ts'
import { backupDatabase } from '../db/backup.ts'

// `npm run db:backup [FILE]`: a pg_dump archive of DATABASE_URL, or of the embedded database.
const config = loadConfig()
const stamp = new Date().toISOString().replace(/[:.]/g, '-')
const file = resolve(process.argv[2] ?? join(config.dataDir, 'backups', `ratiograph-${stamp}.dump`))
mkdirSync(join(file, '..'), { recursive: true, mode: 0o700 })
// the cluster is found where it lives (also when it was moved out of a private folder) and at its own port
const pg = config.databaseUrl ? undefined : await startEmbeddedPostgres({ dir: join(config.dataDir, 'pg'), port: config.embeddedPgPort, durable: true, log: (m) => console.log(m) })
try {
  backupDatabase(config.databaseUrl ?? pg!.url, file)
  console.log(`backup written: ${file}`)
} finally {
  // leave a cluster that `npm start` is using alone; stop only one we started
  if (pg?.startedHere) pg.stop()
}

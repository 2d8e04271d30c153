import { join, resolve } from 'node:path'
import { loadConfig } from '../config.ts'
import { startEmbeddedPostgres } from '../db/embedded-postgres.ts'
import { restoreDatabase } from '../db/backup.ts'

// `npm run db:restore FILE`: replaces the database's contents with a backup archive.
const arg = process.argv[2]
if (!arg) { console.error('usage: npm run db:restore FILE'); process.exit(2) }
const config = loadConfig()
const pg = config.databaseUrl ? undefined : await startEmbeddedPostgres({ dir: join(config.dataDir, 'pg'), port: config.embeddedPgPort, durable: true, log: (m) => console.log(m) })
try {
  restoreDatabase(config.databaseUrl ?? pg!.url, resolve(arg))
  console.log(`restored from ${resolve(arg)}`)
} finally {
  if (pg?.startedHere) pg.stop()
}

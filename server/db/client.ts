import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres'
import { migrate } from 'drizzle-orm/node-postgres/migrator'
import pg from 'pg'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../config.ts'
import * as schema from './schema.ts'
import { registerLayout } from '../services/stored-results.ts'

export type Db = NodePgDatabase<typeof schema> & { $client: pg.Pool }

// bigint counts come back as strings by default; ours fit in a double.
pg.types.setTypeParser(20, (v) => Number(v))

export function connect(url: string, max = 10): Db {
  const pool = new pg.Pool({ connectionString: url, max, connectionTimeoutMillis: 5000 })
  // A client losing its server (database restart) must not crash the process: idle clients report
  // on the pool, checked-out ones on themselves (their pending query rejects as well, and the pool
  // drops the broken client when it is released).
  pool.on('error', () => {})
  pool.on('connect', (client) => { client.on('error', () => {}) })
  return drizzle(pool, { schema, casing: 'snake_case' }) as Db
}

export async function runMigrations(db: Db) {
  await migrate(db, { migrationsFolder: join(PROJECT_ROOT, 'drizzle') })
  // the stored results' layout, before any write needs its id (registering it inside a long
  // transaction would hold every other writer at the unique index until that one commits)
  await registerLayout(db)
}

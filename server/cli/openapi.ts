import { mkdirSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT, loadConfig } from '../config.ts'
import { connect } from '../db/client.ts'
import { createApp } from '../app.ts'
import { buildOpenApi } from '../http/openapi.ts'

// `npm run openapi`: writes openapi/openapi.json from the registered routes (no database is contacted).
const config = loadConfig({ ...process.env, JWT_SECRET: 'unused', DATA_DIR: join(PROJECT_ROOT, '.data') })
const db = connect('postgres://unused@127.0.0.1:1/unused', 1)
const app = createApp({ db, config, mailer: { send: async () => {}, close: () => {} } })
mkdirSync(join(PROJECT_ROOT, 'openapi'), { recursive: true })
writeFileSync(join(PROJECT_ROOT, 'openapi', 'openapi.json'), JSON.stringify(buildOpenApi(app.routeRegistry.specs), null, 2) + '\n')
await db.$client.end()
console.log('wrote openapi/openapi.json')

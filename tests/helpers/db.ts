import { randomBytes } from 'node:crypto'
import pg from 'pg'

/**
 * A fresh database cloned from the migrated template that `npm test` prepared, so every test file
 * starts from an empty, migrated schema on the real PostgreSQL.
 */
export async function freshDatabaseUrl(): Promise<string> {
  const template = process.env.TEST_TEMPLATE_URL
  if (!template) throw new Error('TEST_TEMPLATE_URL is not set: run the tests with `npm test`')
  const url = new URL(template)
  const name = `t_${randomBytes(6).toString('hex')}`
  const admin = new pg.Client({ connectionString: template.replace(/\/[^/]+$/, '/postgres') })
  await admin.connect()
  try {
    await admin.query(`create database ${name} template ${url.pathname.slice(1)}`)
  } finally {
    await admin.end()
  }
  url.pathname = '/' + name
  return url.toString()
}

import { spawnSync } from 'node:child_process'
import { chmodSync, existsSync } from 'node:fs'
import { ensurePostgresBinaries } from './embedded-postgres.ts'

/** pg_dump in the custom archive format (compressed, restorable table by table). */
export function backupDatabase(url: string, file: string) {
  const bin = ensurePostgresBinaries()
  const r = spawnSync(`${bin}/pg_dump`, ['--format=custom', '--no-owner', '--no-privileges', '--file', file, '--dbname', url], { encoding: 'utf8' })
  if (r.status !== 0) throw new Error(`pg_dump failed: ${r.stderr.trim()}`)
  chmodSync(file, 0o600) // it holds password hashes and API key digests
}

/** Replaces the database's contents with an archive made by backupDatabase. */
export function restoreDatabase(url: string, file: string) {
  if (!existsSync(file)) throw new Error(`no such backup file: ${file}`)
  const bin = ensurePostgresBinaries()
  const r = spawnSync(`${bin}/pg_restore`, ['--clean', '--if-exists', '--no-owner', '--no-privileges', '--single-transaction', '--exit-on-error', '--dbname', url, file], { encoding: 'utf8' })
  if (r.status !== 0) throw new Error(`pg_restore failed: ${r.stderr.trim()}`)
}

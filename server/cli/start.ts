import { startRuntime } from '../runtime.ts'
import { DEMO_ACCOUNTS } from '../seed/demo-accounts.ts'

// `npm start`: embedded PostgreSQL (unless DATABASE_URL), migrations, demo seed, client build, one process.
try {
  const rt = await startRuntime({ seed: process.env.SEED_DEMO !== '0', buildClient: process.env.BUILD_CLIENT !== '0', serveClient: true })
  console.log(`\nRatiograph is running at ${rt.url}\n`)
  console.log('Demo accounts (project "Lantern Nuclei Survey"):')
  for (const a of DEMO_ACCOUNTS) console.log(`  ${a.role.padEnd(8)} ${a.email.padEnd(28)} password: ${a.password}`)
  console.log('\nCtrl-C stops the server and the embedded database.')
  let done = false
  const shutdown = (signal: string) => {
    if (done) return
    done = true
    console.log(`\n${signal}: stopping …`)
    rt.stop().then(() => { console.log('stopped cleanly'); process.exit(0) }, (err) => { console.error(err); process.exit(1) })
  }
  process.on('SIGINT', () => shutdown('SIGINT'))
  process.on('SIGTERM', () => shutdown('SIGTERM'))
} catch (err) {
  console.error(`\nRatiograph could not start: ${err instanceof Error ? err.message : String(err)}`)
  process.exit(1)
}

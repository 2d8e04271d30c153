import { spawn } from 'node:child_process'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../config.ts'
import { startRuntime } from '../runtime.ts'

// `npm run dev`: the API (with the demo seed) plus Vite's dev server with hot reload, /api proxied.
const rt = await startRuntime({ seed: true, serveClient: false })
console.log(`API on ${rt.url}; starting Vite …`)
const vite = spawn(process.execPath, [join(PROJECT_ROOT, 'node_modules', 'vite', 'bin', 'vite.js')], {
  cwd: PROJECT_ROOT, stdio: 'inherit', env: { ...process.env, PORT: String(rt.config.port) },
})
const stop = () => { vite.kill('SIGTERM'); rt.stop().then(() => process.exit(0)) }
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
vite.on('exit', (code) => { if (code) rt.stop().then(() => process.exit(code)) })

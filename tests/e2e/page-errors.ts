import { afterAll, afterEach } from 'vitest'
import { pageErrors } from './browser.ts'

// Every e2e test fails when a page it opened threw an uncaught error or logged console.error.
function check() {
  const errors = pageErrors.splice(0)
  if (errors.length) throw new Error(`${errors.length} error(s) in the browser:\n${errors.join('\n---\n')}`)
}
afterEach(check)
afterAll(check)

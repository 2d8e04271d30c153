import { chromium, type Browser, type Page } from 'playwright-core'
import { existsSync, mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../../server/config.ts'

export const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage']

/**
 * Uncaught errors (and console.error) of every page opened through launchChromium, whichever test
 * opened it; tests/e2e/page-errors.ts fails the running test when any arrived. Failed loads are left
 * to watch(), which judges them by status (the console repeats them without the URL).
 */
export const pageErrors: string[] = []

function guard(page: Page) {
  page.on('pageerror', (e) => pageErrors.push(`uncaught in ${page.url()}: ${e.stack ?? e.message}`))
  page.on('console', (m) => {
    if (m.type() === 'error' && !m.text().startsWith('Failed to load resource')) pageErrors.push(`console.error in ${page.url()}: ${m.text()}`)
  })
}

/** Debian's chromium (the real binary when present: it starts a little faster than the wrapper); every page is guarded. */
export async function launchChromium(): Promise<Browser> {
  const executablePath = existsSync('/usr/lib/chromium/chromium') ? '/usr/lib/chromium/chromium' : '/usr/bin/chromium'
  const browser = await chromium.launch({ executablePath, args: CHROMIUM_ARGS, headless: true })
  // browser.newPage() goes through newContext() as well
  const newContext = browser.newContext.bind(browser)
  browser.newContext = async (...args: Parameters<Browser['newContext']>) => {
    const context = await newContext(...args)
    context.on('page', guard)
    return context
  }
  return browser
}

export const SCREENSHOTS = join(PROJECT_ROOT, 'tests', 'screenshots')
export async function shot(page: Page, name: string) {
  mkdirSync(SCREENSHOTS, { recursive: true })
  await page.screenshot({ path: join(SCREENSHOTS, `${name}.png`), fullPage: true })
}

/** Collects page errors and failed requests; a test asserts the list is empty. */
export function watch(page: Page, origin: string) {
  const problems: string[] = []
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`))
  // failed loads are judged by status below; the console repeats them without the URL
  page.on('console', (m) => { if (m.type() === 'error' && !m.text().startsWith('Failed to load resource')) problems.push(`console: ${m.text()}`) })
  page.on('response', (r) => {
    const url = new URL(r.url())
    // the app asks who is signed in before anyone is: that 401 is the expected answer
    if (r.status() >= 400 && !(r.status() === 401 && url.pathname === '/api/v1/me')) problems.push(`${r.status()} ${r.request().method()} ${url.pathname}`)
  })
  page.on('request', (r) => { if (!r.url().startsWith(origin) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) problems.push(`external request: ${r.url()}`) })
  return problems
}

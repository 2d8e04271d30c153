// `npm run bench:ui`: headless Chromium, a 100,000-galaxy project: time from navigation to the
// first fully drawn diagrams view, and the time to apply a box selection across the panels.
import { buildClientIfStale } from '../../server/runtime.ts'
import { launchChromium } from '../e2e/browser.ts'
import { benchServer, loadGalaxies } from './bench-env.ts'

const N = Number(process.env.BENCH_GALAXIES ?? 100_000)
buildClientIfStale((m) => console.log(m))
const env = await benchServer()
await loadGalaxies(env, N, 13)
const browser = await launchChromium()
const page = await browser.newPage({ viewport: { width: 1920, height: 1080 } })
await page.goto(`${env.rt.url}/sign-in`)
await page.getByTestId('sign-in-email').locator('input').fill('bench@example.org')
await page.getByTestId('sign-in-password').locator('input').fill('benchmark password')
await page.getByTestId('sign-in-submit').click()
await page.waitForURL(/\/projects/)

const drawn = () => page.waitForFunction(() => ['nii', 'sii', 'oi', 'whan'].every((k) => {
  const el = document.querySelector(`[data-testid="diagram-${k}"]`)
  return !!el && !!el.querySelector('.main-svg') && !!el.querySelector('canvas')
}), undefined, { timeout: 120_000, polling: 16 })
const results: number[] = []
for (let run = 0; run < 3; run++) {
  const t0 = Date.now()
  await page.goto(`${env.rt.url}/projects/${env.projectId}/diagrams`)
  await drawn()
  await page.evaluate(() => new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok))))
  results.push(Date.now() - t0)
}
results.sort((a, b) => a - b)
console.log(`navigation → diagrams drawn (${N} galaxies): median ${results[1]} ms, best ${results[0]} ms (target ≤ 3000 ms)`)

const box = await page.getByTestId('diagram-nii').locator('.nsewdrag').first().boundingBox()
if (!box) throw new Error('no drag layer on the [N II] diagram')
const selectTimes: number[] = []
for (let run = 0; run < 3; run++) {
  const before = await page.getByTestId('selection-count').textContent()
  const x0 = box.x + box.width * (0.3 + 0.05 * run), y0 = box.y + box.height * 0.3
  await page.mouse.move(x0, y0)
  await page.mouse.down()
  const t0 = Date.now()
  await page.mouse.move(x0 + box.width * 0.3, y0 + box.height * 0.4, { steps: 4 })
  await page.mouse.up()
  await page.waitForFunction((b) => document.querySelector('[data-testid="selection-count"]')?.textContent !== b, before, { timeout: 30_000, polling: 8 })
  await page.evaluate(() => new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok))))
  selectTimes.push(Date.now() - t0)
}
selectTimes.sort((a, b) => a - b)
console.log(`box selection applied across 4 panels: median ${selectTimes[1]} ms, best ${selectTimes[0]} ms; ${await page.getByTestId('selection-count').textContent()} (target ≤ 500 ms)`)
await browser.close()
await env.close()

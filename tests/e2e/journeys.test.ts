import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { parse } from 'csv-parse/sync'
import { DEMO_ACCOUNTS } from '../../server/seed/demo-accounts.ts'
import { launchChromium, pageErrors, shot, watch } from './browser.ts'

const base = inject('baseUrl')
let browser: Browser
beforeAll(async () => { browser = await launchChromium() })
afterAll(async () => { await browser?.close() })

const account = (role: 'owner' | 'analyst' | 'viewer') => DEMO_ACCOUNTS.find((a) => a.role === role)!

async function signIn(role: 'owner' | 'analyst' | 'viewer') {
  const context = await browser.newContext({ viewport: { width: 1600, height: 1000 }, acceptDownloads: true })
  const page = await context.newPage()
  const problems = watch(page, base)
  await page.goto(`${base}/sign-in`)
  // the app asks who is signed in first; typing before that answer can land in a form about to be redrawn
  await page.waitForLoadState('networkidle')
  const email = page.getByTestId('sign-in-email').locator('input'), password = page.getByTestId('sign-in-password').locator('input')
  await email.fill(account(role).email)
  await password.fill(account(role).password)
  expect([await email.inputValue(), await password.inputValue()]).toEqual([account(role).email, account(role).password])
  await page.getByTestId('sign-in-submit').click()
  await page.waitForURL(/\/projects/)
  const projects = await (await page.request.get(`${base}/api/v1/projects`)).json()
  const demo = projects.items.find((p: { name: string }) => p.name === 'Lantern Nuclei Survey')
  return { page, problems, projectId: demo.id as string, context }
}
const csrfOf = async (page: Page) => (await page.context().cookies()).find((c) => c.name === 'rg_csrf')!.value

describe('a scientist\'s day in the dashboard', () => {
  it('signs in and sees the demo project', async () => {
    const { page, problems } = await signIn('owner')
    await expect.poll(() => page.getByText('Lantern Nuclei Survey').first().isVisible()).toBe(true)
    expect(await page.evaluate(() => document.fonts.check('16px Roboto'))).toBe(true)
    await shot(page, 'e2e-projects')
    expect(problems).toEqual([])
  })

  it('uploads a CSV through the wizard and finds its galaxies in the table', async () => {
    const { page, projectId, problems } = await signIn('analyst')
    await page.goto(`${base}/projects/${projectId}/intake`)
    const csv = ['galaxy_id,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err,nii_6584_flux,nii_6584_err,oiii_5007_flux,oiii_5007_err',
      'E2E-0000001,0.04,300,6,80,3,60,3,50,3', 'E2E-0000002,0.06,300,6,90,3,330,6,800,10', 'E2E-0000003,0.08,280,6,75,3,70,3,40,3'].join('\n')
    await page.getByTestId('intake-file').setInputFiles({ name: 'e2e-upload.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) })
    await page.getByTestId('mapping-validate').click()
    await page.getByTestId('mapping-commit').click()
    await expect.poll(() => page.getByTestId('intake-result').isVisible(), { timeout: 20_000 }).toBe(true)
    await shot(page, 'e2e-intake-done')
    await page.goto(`${base}/projects/${projectId}/galaxies`)
    await page.getByTestId('filter-q').locator('input').fill('E2E-')
    await page.getByTestId('filter-q').locator('input').press('Enter')
    await expect.poll(async () => (await page.getByTestId('galaxy-table').innerText()).includes('E2E-0000002'), { timeout: 20_000 }).toBe(true)
    const text = await page.getByTestId('galaxy-table').innerText()
    expect(text).toContain('E2E-0000001')
    expect(text).toContain('E2E-0000003')
    await shot(page, 'e2e-galaxies')
    expect(problems).toEqual([])
  })

  it('loads Diagrams in full (demo data), again and again, without one error in the page', async () => {
    const { page, projectId, problems } = await signIn('viewer')
    // The race behind the old errors, made certain: the project's assumptions (extinction law, R_V:
    // they relabel each frame) arrive after plotly has loaded but before the panels have drawn their
    // frames — the panels wait a few animation frames for their width, slowed here as on a busy machine.
    await page.addInitScript(() => {
      const w = window as unknown as Record<string, unknown>
      // plotly reads window.PlotlyLocales as its module finishes loading
      Object.defineProperty(window, 'PlotlyLocales', { configurable: true, get: () => { w.__plotlyLoaded = true; return undefined } })
      const raf = window.requestAnimationFrame.bind(window)
      window.requestAnimationFrame = (cb) => { setTimeout(() => raf(cb), 60); return 0 }
    })
    const panelsWaiting = () => page.evaluate(() => !!(window as unknown as { __plotlyLoaded?: boolean }).__plotlyLoaded &&
      document.querySelectorAll('[data-testid="diagram-grid"] .plot').length === 4)
    let held = 0
    await page.route(/\/api\/v1\/projects\/[^/]+\/assumptions$/, async (route) => {
      for (let i = 0; i < 200 && !(await panelsWaiting().catch(() => false)); i++) await new Promise((ok) => setTimeout(ok, 25))
      held++
      await route.continue()
    })
    const drawn = async () => {
      for (const k of ['nii', 'sii', 'oi', 'whan']) await page.locator(`[data-testid="diagram-${k}"][data-drawn="true"]`).waitFor({ timeout: 60_000 })
      await page.waitForLoadState('networkidle')
      // a few frames for anything the panels scheduled after drawing (a resize, a repaint)
      await page.evaluate(() => new Promise((done) => { let n = 0; const tick = () => (++n < 4 ? requestAnimationFrame(tick) : done(null)); requestAnimationFrame(tick) }))
    }
    // a full load, then reloads with plotly cached
    await page.goto(`${base}/projects/${projectId}/diagrams`)
    await drawn()
    for (let i = 0; i < 2; i++) { await page.reload(); await drawn() }
    expect(held).toBe(3)
    expect(Number(await page.getByTestId('diagram-nii').getAttribute('data-placed'))).toBeGreaterThan(1000)
    // a change after the first draw still reaches the frame: the reddening arrow switched off
    const annotations = () => page.evaluate(() => (document.querySelector('[data-testid="diagram-nii"] .js-plotly-plot') as unknown as { layout: { annotations?: unknown[] } }).layout.annotations?.length ?? 0)
    const before = await annotations()
    await page.getByTestId('toggle-reddening').locator('input').click()
    await expect.poll(annotations, { timeout: 10_000 }).not.toBe(before)
    await drawn()
    expect(problems).toEqual([])
    expect(pageErrors).toEqual([])
  })

  it('selects a group with a box: the same galaxies are highlighted in every panel and listed below', async () => {
    const { page, projectId, problems } = await signIn('viewer')
    await page.goto(`${base}/projects/${projectId}/diagrams`)
    for (const k of ['nii', 'sii', 'oi', 'whan']) await page.locator(`[data-testid="diagram-${k}"][data-ready="true"]`).waitFor({ timeout: 60_000 })
    // the points are our own canvas layer under plotly's frame (axes, lines, outlines)
    expect(await page.locator('[data-testid="diagram-nii"] [data-renderer]').getAttribute('data-renderer')).toBe('canvas')
    for (const k of ['nii', 'sii', 'oi', 'whan']) await page.locator(`[data-testid="diagram-${k}"][data-drawn="true"]`).waitFor({ timeout: 30_000 })
    const drag = await page.getByTestId('diagram-nii').locator('.nsewdrag').first().boundingBox()
    expect(drag).not.toBeNull()
    // a box over the star-forming branch, left-middle of the [N II] panel
    await page.mouse.move(drag!.x + drag!.width * 0.25, drag!.y + drag!.height * 0.3)
    await page.mouse.down()
    await page.mouse.move(drag!.x + drag!.width * 0.55, drag!.y + drag!.height * 0.65, { steps: 6 })
    await page.mouse.up()
    await expect.poll(async () => Number(await page.getByTestId('selection-count').textContent()), { timeout: 10_000 }).toBeGreaterThan(0)
    const count = Number(await page.getByTestId('selection-count').textContent())
    // each panel highlights the selection; galaxies without a position on a diagram cannot be drawn there
    await expect.poll(() => page.getByTestId('diagram-nii').getAttribute('data-selected')).toBe(String(count))
    for (const k of ['sii', 'oi', 'whan']) {
      const n = Number(await page.getByTestId(`diagram-${k}`).getAttribute('data-selected'))
      expect(n).toBeGreaterThan(0)
      expect(n).toBeLessThanOrEqual(count)
    }
    // the highlighted layer holds coloured pixels inside the box and none far outside it
    const painted = await page.evaluate(() => {
      const canvases = document.querySelectorAll('[data-testid="diagram-nii"] canvas.points')
      const sel = canvases[1] as HTMLCanvasElement
      const d = sel.getContext('2d')!.getImageData(0, 0, sel.width, sel.height).data
      let inside = 0, rightEdge = 0
      for (let y = 0; y < sel.height; y++) for (let x = 0; x < sel.width; x++) {
        if (d[(y * sel.width + x) * 4 + 3] === 0) continue
        if (x > sel.width * 0.9) rightEdge++; else inside++
      }
      return { inside, rightEdge }
    })
    expect(painted.inside).toBeGreaterThan(100)
    expect(painted.rightEdge).toBe(0)
    const rows = await page.getByTestId('selection-row').count()
    expect(rows).toBeGreaterThan(0)
    await shot(page, 'e2e-diagrams-selection')
    // hover a selected galaxy where plotly's own axis puts it: the tooltip names it; a click opens it
    const firstRow = page.getByTestId('selection-row').first()
    const hoverId = (await firstRow.locator('a').innerText()).trim()
    const spot = await page.evaluate((id) => {
      const gd = document.querySelector('[data-testid="diagram-nii"] .js-plotly-plot') as unknown as {
        _fullLayout: { _size: { l: number; t: number }; xaxis: { l2p: (v: number) => number }; yaxis: { l2p: (v: number) => number } }
        getBoundingClientRect: () => DOMRect
      }
      const rowCells = [...document.querySelectorAll('[data-testid="selection-row"]')].find((r) => r.textContent?.includes(id))!.querySelectorAll('td')
      const x = Number(rowCells[4].textContent), y = Number(rowCells[5].textContent)
      const r = gd.getBoundingClientRect(), fl = gd._fullLayout
      const dx = fl._size.l + fl.xaxis.l2p(x), dy = fl._size.t + fl.yaxis.l2p(y)
      return { x: r.left + dx, y: r.top + dy, dx, dy }
    }, hoverId)
    await page.mouse.move(spot.x, spot.y)
    await expect.poll(() => page.getByTestId('diagram-tip').isVisible(), { timeout: 5_000 }).toBe(true)
    const tipId = (await page.getByTestId('diagram-tip').innerText()).split('\n')[0].trim()
    expect(tipId).toMatch(/^\S+$/)
    await shot(page, 'e2e-diagrams-hover')
    // open a galaxy from the selection table
    const firstId = (await page.getByTestId('selection-row').first().locator('a').innerText()).trim()
    await page.getByTestId('selection-row').first().locator('a').click()
    await page.waitForURL(/\/galaxies\/[^/]+$/)
    expect(decodeURIComponent(page.url())).toContain(firstId)
    await page.getByTestId('flux-table').waitFor()
    await expect.poll(() => page.getByTestId('diagnostics-panel').isVisible()).toBe(true)
    await shot(page, 'e2e-galaxy')
    // back on the diagrams, a click on the hovered spot opens that galaxy
    await page.goBack()
    await page.locator('[data-testid="diagram-nii"][data-drawn="true"]').waitFor({ timeout: 30_000 })
    // the page may come back scrolled: the spot is kept relative to the plot
    await page.getByTestId('diagram-nii').scrollIntoViewIfNeeded()
    const plot = await page.locator('[data-testid="diagram-nii"] .js-plotly-plot').boundingBox()
    await page.mouse.move(plot!.x + spot.dx, plot!.y + spot.dy)
    await page.mouse.down()
    await page.mouse.up()
    await page.waitForURL(/\/galaxies\/[^/]+$/)
    expect(decodeURIComponent(page.url())).toContain(`/galaxies/${tipId}`)
    expect(problems).toEqual([])
  })

  it('selects with a lasso from the toolbar, and the points follow a zoom', async () => {
    const { page, projectId, problems } = await signIn('viewer')
    await page.goto(`${base}/projects/${projectId}/diagrams`)
    for (const k of ['nii', 'sii', 'oi', 'whan']) await page.locator(`[data-testid="diagram-${k}"][data-drawn="true"]`).waitFor({ timeout: 60_000 })
    const sii = page.getByTestId('diagram-sii')
    await sii.hover()
    const titles = await sii.locator('.modebar-btn').evaluateAll((els) => els.map((e) => e.getAttribute('data-title')))
    expect(titles).toEqual(expect.arrayContaining(['Box Select', 'Lasso Select', 'Zoom', 'Pan', 'Save this diagram as PNG']))
    await sii.locator('[data-title="Lasso Select"]').click()
    const b = (await sii.locator('.nsewdrag').first().boundingBox())!
    await page.mouse.move(b.x + b.width * 0.2, b.y + b.height * 0.2)
    await page.mouse.down()
    for (const [fx, fy] of [[0.5, 0.2], [0.5, 0.6], [0.2, 0.6], [0.21, 0.21]]) await page.mouse.move(b.x + b.width * fx, b.y + b.height * fy, { steps: 5 })
    await page.mouse.up()
    await expect.poll(async () => Number(await page.getByTestId('selection-count').textContent()), { timeout: 10_000 }).toBeGreaterThan(0)
    const count = await page.getByTestId('selection-count').textContent()
    await expect.poll(() => sii.getAttribute('data-selected')).toBe(count)
    // a zoom from the toolbar redraws the point layer for the new window
    const nii = page.getByTestId('diagram-nii')
    const paints = () => page.evaluate(() => performance.getEntriesByName('rg:points-nii').length)
    const before = await paints()
    await nii.hover()
    await nii.locator('[data-title="Zoom in"]').click()
    await expect.poll(paints, { timeout: 5_000 }).toBeGreaterThan(before)
    const range = await page.evaluate(() => (document.querySelector('[data-testid="diagram-nii"] .js-plotly-plot') as unknown as { layout: { xaxis: { range: number[] } } }).layout.xaxis.range)
    expect(range[1] - range[0]).toBeLessThan(3.1 * 0.75) // the full window is 3.1 dex wide
    await shot(page, 'e2e-diagrams-lasso-zoom')
    // from the keyboard: a class in the legend selects all its galaxies in every panel
    await page.getByTestId('legend-seyfert').focus()
    await page.keyboard.press('Enter')
    await expect.poll(() => page.getByTestId('selection-count').textContent(), { timeout: 5_000 }).not.toBe(count)
    const seyferts = Number(await page.getByTestId('selection-count').textContent())
    expect(seyferts).toBeGreaterThan(0)
    const overall = await page.evaluate(async (pid) => (await (await fetch(`/api/v1/projects/${pid}/galaxies?class=seyfert&limit=1`)).json()).total, projectId)
    expect(seyferts).toBe(overall)
    expect(problems).toEqual([])
  })

  it('exports CSV with the project\'s rows and values', async () => {
    const { page, projectId } = await signIn('viewer')
    await page.goto(`${base}/projects/${projectId}/exports`)
    const href = await page.getByTestId('export-download-csv').getAttribute('href')
    expect(href).toContain(`/api/v1/projects/${projectId}/exports/galaxies.csv`)
    const res = await page.request.get(new URL(href!, base).toString())
    expect(res.status()).toBe(200)
    const text = await res.text()
    expect(text).toMatch(/# assumptions revision: \d+/)
    const rows = parse(text.split('\n').filter((l) => !l.startsWith('#')).join('\n'), { columns: true }) as Array<Record<string, string>>
    const project = await (await page.request.get(`${base}/api/v1/projects/${projectId}`)).json()
    expect(rows.length).toBe(project.galaxyCount)
    const one = rows.find((r) => r.galaxy_id === 'E2E-0000002')
    if (one) expect(Number(one.niiHa)).toBeCloseTo(Math.log10(330 / 300), 6)
    const api = await (await page.request.get(`${base}/api/v1/projects/${projectId}/galaxies/${encodeURIComponent(rows[0].galaxy_id)}`)).json()
    expect(rows[0].class_overall).toBe(api.results.classes.overall)
    await shot(page, 'e2e-exports')
  })

  it('creates an API key (shown once) and revokes it; the key stops working', async () => {
    const { page } = await signIn('analyst')
    await page.goto(`${base}/keys`)
    await page.getByTestId('key-create-open').click()
    await page.getByTestId('key-name').locator('input').fill('e2e pipeline')
    await page.getByTestId('key-create-submit').click()
    const key = (await page.getByTestId('key-secret').textContent())!.trim()
    expect(key).toMatch(/^rg_/)
    await shot(page, 'e2e-key-created')
    const fresh = await browser.newContext()
    expect((await fresh.request.get(`${base}/api/v1/me`, { headers: { authorization: `Bearer ${key}` } })).status()).toBe(200)
    await page.getByTestId('key-done').click()
    await page.getByTestId('key-row-e2e pipeline').getByTestId('key-revoke').click()
    await page.getByTestId('key-revoke-confirm').click()
    await expect.poll(async () => (await fresh.request.get(`${base}/api/v1/me`, { headers: { authorization: `Bearer ${key}` } })).status()).toBe(401)
    await fresh.close()
  })

  it('a viewer sees no upload or assumption controls, and the server refuses them too', async () => {
    const { page, projectId } = await signIn('viewer')
    await page.goto(`${base}/projects/${projectId}/intake`)
    await page.waitForLoadState('networkidle')
    expect(await page.getByTestId('intake-file').count()).toBe(0)
    await page.goto(`${base}/projects/${projectId}/assumptions`)
    await page.waitForLoadState('networkidle')
    expect(await page.getByTestId('assumptions-save').count()).toBe(0)
    await shot(page, 'e2e-viewer-assumptions')
    const csrf = await csrfOf(page)
    const put = await page.request.put(`${base}/api/v1/projects/${projectId}/assumptions`, { headers: { 'x-csrf-token': csrf }, data: { settings: {} } })
    expect(put.status()).toBe(403)
    const batch = await page.request.post(`${base}/api/v1/projects/${projectId}/galaxies/batch`, { headers: { 'x-csrf-token': csrf }, data: { galaxies: [{ id: 'V-1', lines: {} }] } })
    expect(batch.status()).toBe(403)
  })
})

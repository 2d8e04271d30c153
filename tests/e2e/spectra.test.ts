import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { Browser } from 'playwright-core'
import { DEMO_ACCOUNTS } from '../../server/seed/demo-accounts.ts'
import { syntheticSpectrum } from '../../shared/spectra/synthetic.ts'
import { launchChromium, shot, watch } from './browser.ts'

/**
 * Spectra in the dashboard, as an analyst meets them: upload a FITS file and a CSV table together,
 * follow the fit, find both in the fit-quality table, open a galaxy's spectrum view, zoom to Hα and
 * refit it with other settings to compare.
 */
const base = inject('baseUrl')
let browser: Browser
beforeAll(async () => { browser = await launchChromium() })
afterAll(async () => { await browser?.close() })

const analyst = DEMO_ACCOUNTS.find((a) => a.role === 'analyst')!
const FITS = join(import.meta.dirname, '../fixtures/formats/fits/image-linear-air.fits')

describe('spectra in the dashboard', () => {
  it('uploads a FITS file and a CSV, lists their fits, and shows a galaxy\'s spectrum, zoomed and refitted', async () => {
    const context = await browser.newContext({ viewport: { width: 1600, height: 1000 } })
    const page = await context.newPage()
    const problems = watch(page, base)
    await page.goto(`${base}/sign-in`)
    await page.waitForLoadState('networkidle')
    await page.getByTestId('sign-in-email').locator('input').fill(analyst.email)
    await page.getByTestId('sign-in-password').locator('input').fill(analyst.password)
    await page.getByTestId('sign-in-submit').click()
    await page.waitForURL(/\/projects/)
    const projectId = (await (await page.request.get(`${base}/api/v1/projects`)).json()).items.find((p: { name: string }) => p.name === 'Lantern Nuclei Survey').id as string
    // a demo galaxy: the CSV is named after it and carries no redshift, so the galaxy's z in the project places its lines
    const demo = (await (await page.request.get(`${base}/api/v1/projects/${projectId}/galaxies?limit=1&sort=id`)).json()).items[0] as { id: string; redshift: number }
    const z = demo.redshift
    const { spectrum } = syntheticSpectrum({
      seed: 11, redshift: z, wavelength: { start: Math.round(4700 * (1 + z)), end: Math.round(6800 * (1 + z)), step: 1 },
      continuum: { level: 10 }, noise: 0.2, resolution: { resolvingPower: 2000 },
      lines: [
        { id: 'hbeta', flux: 210, sigma: 110 }, { id: 'oiii_5007', flux: 90, sigma: 110 }, { id: 'oi_6300', flux: 12, sigma: 110 },
        { id: 'halpha', flux: 600, sigma: 110 }, { id: 'nii_6584', flux: 150, sigma: 110 }, { id: 'sii_6717', flux: 80, sigma: 110 }, { id: 'sii_6731', flux: 60, sigma: 110 },
      ],
    })
    const csv = ['wavelength,flux,error', ...spectrum.wavelength.map((w, i) => `${w.toFixed(3)},${spectrum.flux[i].toFixed(5)},${spectrum.error[i]}`)].join('\n')

    await page.goto(`${base}/projects/${projectId}/spectra`)
    await page.getByTestId('spectra-files').setInputFiles([
      { name: 'image-linear-air.fits', mimeType: 'application/fits', buffer: readFileSync(FITS) },
      { name: `${demo.id}.csv`, mimeType: 'text/csv', buffer: Buffer.from(csv) },
    ])
    await page.getByTestId('spectra-upload-send').click()
    await expect.poll(() => page.getByTestId('spectra-report').isVisible(), { timeout: 30_000 }).toBe(true)
    const report = await page.getByTestId('spectra-report').innerText()
    expect(report).toContain('FIX-IMAGE-1') // the FITS file's OBJECT
    expect(report).toContain(demo.id)
    await expect.poll(() => page.getByTestId('job-progress').getAttribute('data-status'), { timeout: 60_000 }).toBe('done')
    await shot(page, 'e2e-spectra-uploaded')

    // both fits in the fit-quality table, with a χ²/dof each
    const table = page.getByTestId('fit-quality-table')
    await expect.poll(async () => (await table.innerText()).includes(demo.id) && (await table.innerText()).includes('FIX-IMAGE-1'), { timeout: 20_000 }).toBe(true)
    const row = table.locator('tbody tr', { hasText: demo.id })
    const chi2dof = Number((await row.locator('td').nth(1).innerText()).trim())
    expect(chi2dof).toBeGreaterThan(0.5)
    expect(chi2dof).toBeLessThan(2) // a spectrum drawn from the model the fit assumes (Gaussian lines, white noise)
    await shot(page, 'e2e-spectra-table')

    // the galaxy's spectrum view: the whole spectrum, then the Hα complex
    await row.locator('a').click()
    await page.waitForURL(new RegExp(`/galaxies/${demo.id}$`))
    const plot = page.getByTestId('spectrum-plot')
    await expect.poll(async () => Number(await plot.getAttribute('data-drawn')), { timeout: 30_000 }).toBeGreaterThan(0)
    expect(await page.getByTestId('fit-numbers').innerText()).toContain('Hα 6563')
    await page.getByTestId('complex-halpha').click()
    await expect.poll(() => plot.getAttribute('data-range')).not.toBe('all')
    const [from, to] = (await plot.getAttribute('data-range'))!.split('-').map(Number)
    // Hα + [N II] at (1 + z) λ_rest ± 1500 km/s (src/lib/spectra/complexes.ts)
    expect(from).toBeLessThan(6548.05 * (1 + z))
    expect(to).toBeGreaterThan(6583.45 * (1 + z))
    expect(to - from).toBeLessThan(200)
    await shot(page, 'e2e-spectrum-halpha')

    // refit with two components allowed and compare
    await page.getByTestId('refit-expander').locator('button').first().click()
    await page.getByTestId('refit-run').click()
    await expect.poll(() => page.getByTestId('fit-compare').isVisible(), { timeout: 60_000 }).toBe(true)
    expect(await page.getByTestId('fit-compare').innerText()).toContain('Hα 6563')
    await shot(page, 'e2e-spectrum-refit')
    expect(problems).toEqual([])
    await context.close()
  })
})

import { describe, expect, it } from 'vitest'
import { formatSignificant, fromSI } from '../../shared/charts/units.js'
import { computeDemoSpectrum } from '../../src/workers/computeDemoSpectrum.js'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()

describe('Overview', () => {
  it('shows the demo record spectrum computed in the browser, equal to the engine run in Node', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    // The home page is the firm's workspace once records exist; the demo keeps its own page.
    await page.goto(`${env.server.url}/demo`)
    const table = page.locator('[data-test="ordinates-table"]')
    await table.waitFor({ timeout: 30_000 })

    expect(await page.locator('[data-test="synthetic-label"]').innerText()).toBe('synthetic demo record')
    const chart = page.locator('figure svg[role="img"]').first()
    expect(await chart.locator('desc').textContent()).toContain(
      'Pseudo-spectral acceleration, PSA (g) against period T (s)',
    )
    expect(await page.locator('[data-test="cautions"]').innerText()).toContain('licensed engineer of record')

    // The default grid has 100 periods per decade from 0.01 s, so T = 1 s is row 201 of 301.
    // Sorted by descending period it is row 101: the first row of page 6 at 20 rows a page.
    await table.getByRole('columnheader', { name: /Period T \(s\)/ }).click()
    await table.getByText('6', { exact: true }).click()
    const row = table.locator('tbody tr').first()
    const cells = (await row.locator('td').allInnerTexts()).map((t) => t.trim())
    expect(cells[0]).toBe('1.000')

    const reference = computeDemoSpectrum(0.05)
    const i = Array.from(reference.periodsS).findIndex((t) => Math.abs(t - 1) < 1e-12)
    const psaAt1s = reference.curve.psaMPerS2[i] ?? NaN
    expect(cells[5]).toBe(formatSignificant(fromSI(psaAt1s, 'g')))
    expect(cells[1]).toBe(formatSignificant(fromSI(reference.curve.sdM[i] ?? NaN, 'mm')))

    // The chart's keyboard readout reaches the same ordinate: Home, then 20 steps of 10 periods.
    const surface = page.locator('.chart-surface').first()
    await surface.focus()
    await page.keyboard.press('Home')
    for (let k = 0; k < 20; k++) await page.keyboard.press('Shift+ArrowRight')
    const readout = await page.locator('[data-test="chart-readout"]').innerText()
    expect(readout).toContain('T = 1.00 s')
    expect(readout).toContain(`${formatSignificant(fromSI(psaAt1s, 'g'))} g`)

    await page.screenshot({ path: artifactPath('overview-engineer.png'), fullPage: true })
    await page.close()
  })

  it("zooms the demo record's plot to a dragged window and back to the whole record", async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.checker.email)
    await page.goto(`${env.server.url}/demo`)
    await page.locator('[data-test="ordinates-table"]').waitFor({ timeout: 30_000 })
    const history = page.locator('.chart-surface').nth(1)
    const window = page.getByText(/^Showing .* s\. Drag across the plot to zoom\.$/)
    expect(await window.innerText()).toContain('Showing 0–40.0 s')
    await history.scrollIntoViewIfNeeded()
    const box = await history.boundingBox()
    if (!box) throw new Error('the record plot has no box')
    await page.mouse.move(box.x + box.width * 0.3, box.y + box.height * 0.4)
    await page.mouse.down()
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.4, { steps: 5 })
    await page.mouse.up()
    expect(await window.innerText()).not.toContain('Showing 0–40.0 s')
    await page.getByRole('button', { name: 'Whole record' }).click()
    expect(await window.innerText()).toContain('Showing 0–40.0 s')
    await page.close()
  })
})

import { describe, expect, it } from 'vitest'
import { formatSignificant } from '../../shared/charts/units.js'
import { spectrumResultSchema } from '../../shared/schemas/spectrum.js'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()

const G = 9.80665 // standard gravity, m/s² (3rd CGPM, 1901)

describe('runs in the browser', () => {
  it('starts a run from the demo record, watches it finish and reads PSA at 1 s in the table', async () => {
    await env.browser.context.clearCookies()
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Records' }).click()
    await page.locator('[data-test="records-table"]').getByText('Synthetic far-field noise').click()
    await page.waitForURL(/\/records\/[0-9a-f-]+$/)

    const form = page.locator('[data-test="new-run-form"]')
    await form.waitFor()
    // 5% is preselected; the cost and the firm's 25 demo credits are shown.
    await expect(form.locator('[data-test="damping-tags"]').innerText()).resolves.toContain('5%')
    await form.locator('[data-test="credit-balance"]').waitFor()
    await expect(form.locator('[data-test="run-cost"]').innerText()).resolves.toMatch(/1 credit.*25 credits/s)
    // Add 2% as a second damping tag, typed as an engineer would.
    await form.locator('[data-test="damping-tags"] button').last().click()
    await page.getByLabel('Add a damping ratio in percent').fill('2')
    await page.getByLabel('Add a damping ratio in percent').press('Enter')
    await expect(form.locator('[data-test="damping-tags"]').innerText()).resolves.toMatch(/5%[\s\S]*2%/)
    await page.screenshot({ path: artifactPath('runs-new-run-form.png'), fullPage: true })
    await form.locator('[data-test="start-run"]').click()

    await page.waitForURL(/\/runs\/[0-9a-f-]+$/)
    const runId = page.url().split('/').at(-1)!
    // The live progress bar is shown until the run ends, then the results replace it.
    await page.locator('[data-test="run-progress"]').waitFor()
    await page.screenshot({ path: artifactPath('runs-progress.png') })
    const table = page.locator('[data-test="run-ordinates"]')
    await table.waitFor({ timeout: 60_000 })
    await expect(page.locator('[data-test="run-status"]').first().innerText()).resolves.toBe('Done')

    const row = table.locator('tr[data-period="1"]')
    const cells = await row.locator('td').allInnerTexts()
    expect(cells[0]).toBe('1.000')
    expect(cells).toHaveLength(3)
    const shownPsaG = cells[1]! // the 5% column comes first, as the damping ratios were given

    // The same ordinate from the API: PSA at T = 1 s (on the default grid), 5% damping, in g.
    const api = spectrumResultSchema.parse(
      await (await page.request.get(`${env.server.url}/api/runs/${runId}/spectrum`)).json(),
    )
    const i = api.periodsS.indexOf(1)
    expect(i).toBeGreaterThan(0)
    expect(api.curves.map((c) => c.dampingRatio)).toEqual([0.05, 0.02])
    const psaG = api.curves[0]!.psaMPerS2[i]! / G
    expect(psaG).toBeGreaterThan(0)
    expect(shownPsaG).toBe(formatSignificant(psaG, 4))

    await expect(page.locator('[data-test="cautions"]').innerText()).resolves.toMatch(/calculation aid/)
    // The method card gives the sub-step rule's summary; the full rule is in the JSON and the sheet.
    const method = await page.locator('.method-card').innerText()
    expect(method).toContain('every ordinate is checked against the exact solution of the same record')
    expect(method).toContain('The full rule is in the calc sheet')
    expect(api.methodStatement.subStepRule).toContain(
      'Each oscillator is also run once on the piecewise-exact',
    )
    // One CSV on the page: the export menu's (the same file as GET /api/runs/:id/spectrum.csv).
    await expect(page.locator('[data-test="download-csv"]').count()).resolves.toBe(0)
    await page.screenshot({ path: artifactPath('runs-run-page.png'), fullPage: true })

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Runs' }).click()
    const list = page.locator('[data-test="runs-table"]')
    await list.getByText('Synthetic far-field noise').waitFor()
    await expect(list.locator('[data-test="run-status"]').first().innerText()).resolves.toBe('Done')
    await page.screenshot({ path: artifactPath('runs-list.png'), fullPage: true })
    await page.close()
  })
})

import { describe, expect, it } from 'vitest'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()

describe('record processing in the browser', () => {
  it('processes the drifting demo record, watches the preview change, saves the child and runs it', async () => {
    await env.browser.context.clearCookies()
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Records' }).click()
    await page
      .locator('[data-test="records-table"]')
      .getByText('Synthetic far-field with baseline drift', { exact: true })
      .click()
    await page.waitForURL(/\/records\/[0-9a-f-]+$/)
    const parentPath = new URL(page.url()).pathname

    // The drift warning links to the panel; the demo's processed child is listed as lineage.
    await page.locator('[data-test="drift-warning-link"]').first().click()
    await page.waitForURL(/#process$/)
    await expect(page.locator('[data-test="lineage-children"]').innerText()).resolves.toContain('corrected')

    // The first preview uses the form's defaults: baseline order 1, high-pass 0.1 Hz order 4.
    const summary = page.locator('[data-test="process-summary"]')
    await expect(summary.innerText()).resolves.toMatch(/high-pass 0\.1 Hz order 4/)
    await expect(page.locator('[data-test="process-usable-band"]').innerText()).resolves.toMatch(
      /up to 8(\.0+)? s/,
    )
    await page.locator('[data-test="process-fourier"] svg').waitFor()
    const before = await page.locator('[data-test="process-drift"]').innerText()

    // A new corner: the preview follows (1/(1.25·0.2 Hz) = 4 s).
    await page.locator('#process-hp-hz').fill('0.2')
    await page.locator('#process-hp-hz').press('Tab')
    await page.waitForFunction(() =>
      /high-pass 0\.2 Hz/.test(document.querySelector('[data-test="process-summary"]')?.textContent ?? ''),
    )
    await expect(page.locator('[data-test="process-usable-band"]').innerText()).resolves.toMatch(
      /up to 4(\.0+)? s/,
    )
    expect(await page.locator('[data-test="process-drift"]').innerText()).not.toBe(before)

    // A corner above Nyquist is named beside the field and nothing is asked of the server.
    await page.locator('[data-test="process-lp-on"]').click()
    await page.locator('#process-lp-hz').fill('150')
    await page.locator('#process-lp-hz').press('Tab')
    await expect(page.locator('[data-test="process-lp-error"]').innerText()).resolves.toMatch(/below Nyquist/)
    await page.locator('#process-lp-hz').fill('30')
    await page.locator('#process-lp-hz').press('Tab')
    await page.waitForFunction(() =>
      /low-pass 30 Hz/.test(document.querySelector('[data-test="process-summary"]')?.textContent ?? ''),
    )
    await page.screenshot({ path: artifactPath('processing-panel.png'), fullPage: true })

    await page.locator('#process-name').fill('Drift removed in the browser')
    await page.locator('[data-test="process-save"]').click()
    await page.waitForURL((url) => /\/records\/[0-9a-f-]+$/.test(url.pathname) && url.pathname !== parentPath)
    await expect(page.locator('h1').innerText()).resolves.toContain('Drift removed in the browser')
    await expect(page.locator('[data-test="lineage-parent"]').innerText()).resolves.toMatch(
      /high-pass 0\.2 Hz order 4, then low-pass 30 Hz order 4/,
    )

    // Run the child: the run page states the chain.
    const form = page.locator('[data-test="new-run-form"]')
    await form.waitFor()
    await form.locator('[data-test="start-run"]').click()
    await page.waitForURL(/\/runs\/[0-9a-f-]+$/)
    await page.locator('[data-test="run-ordinates"]').waitFor({ timeout: 120_000 })
    await page.getByText('Processed by Ordinate from the original').first().waitFor()
    await page.screenshot({ path: artifactPath('processing-run.png'), fullPage: true })
    await page.close()
  })
})

import path from 'node:path'
import { describe, expect, it } from 'vitest'
import {
  artifactPath,
  demoMembers,
  repoRoot,
  signInThroughForm,
  useBrowserTestEnvironment,
} from './harness.js'

const env = useBrowserTestEnvironment()

/** The texts naive-ui shows when the product sets none of its own. */
const LIBRARY_TEXTS = /Please Input|Please Select|No Data/

describe('page polish', () => {
  it('leaves the sign-in address once signed in', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.waitForURL((u) => u.pathname !== '/sign-in')
    expect(new URL(page.url()).pathname).toBe('/')
    await page.close()
  })

  it('shows a not-found page for a run, record or comparison that is not there', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    const unknown = '00000000-0000-4000-8000-000000000000'
    const cases = [
      [`/runs/${unknown}`, 'No such run'],
      ['/runs/not-an-id', 'No such run'],
      [`/records/${unknown}`, 'No such record'],
      [`/comparisons/${unknown}`, 'No such comparison'],
      [`/comparisons/new?from=${unknown}`, 'No such comparison'],
      ['/no/such/page', 'Page not found'],
    ] as const
    for (const [address, heading] of cases) {
      await page.goto(`${env.server.url}${address}`)
      await page.locator('[data-test="not-found"]').waitFor()
      expect(await page.getByRole('heading', { level: 1 }).innerText()).toBe(heading)
      expect(await page.locator('[data-test="comparison-name"]').count()).toBe(0)
    }
    await page.screenshot({ path: artifactPath('not-found-comparison.png'), fullPage: true })
    await page.close()
  })

  it('fits the target kinds inside their box on the new-comparison form at 1440 px, in product wording', async () => {
    const page = await env.browser.newPage()
    await page.setViewportSize({ width: 1440, height: 900 })
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.goto(`${env.server.url}/comparisons/new`)
    const editor = page.locator('[data-test="target-editor"]')
    await editor.waitFor()
    await page.locator('[data-test="target-asce"]').click()
    await page.locator('[data-test="asce-sds"]').waitFor()
    const overflow = await editor.evaluate((box) => {
      const right = box.getBoundingClientRect().right
      return [...box.querySelectorAll('.n-radio-button')].map((b) => b.getBoundingClientRect().right - right)
    })
    expect(overflow.length).toBeGreaterThanOrEqual(5)
    for (const past of overflow) expect(past).toBeLessThanOrEqual(0)
    await editor.screenshot({ path: artifactPath('new-comparison-target-1440.png') })
    // The other firm's engineer has no finished run in a new database (the demo firm's work is
    // seeded), so their runs menu is empty: it says so in the product's words.
    await signInThroughForm(page, env.server.url, demoMembers.outsider.email)
    await page.goto(`${env.server.url}/comparisons/new`)
    await page.locator('[data-test="comparison-runs"]').click()
    const menu = page.locator('.n-base-select-menu')
    await menu.waitFor()
    expect(await menu.innerText()).toContain('Nothing to show yet.')
    await page.keyboard.press('Escape')
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    for (const address of ['/comparisons/new', '/runs/new', '/records']) {
      await page.goto(`${env.server.url}${address}`)
      await page.getByRole('heading', { level: 1 }).waitFor()
      await page.waitForTimeout(500)
      expect(await page.locator('body').innerText()).not.toMatch(LIBRARY_TEXTS)
      const placeholders = await page
        .locator('input[placeholder], textarea[placeholder]')
        .evaluateAll((els) => els.map((e) => e.getAttribute('placeholder') ?? ''))
      expect(placeholders.join('|')).not.toMatch(LIBRARY_TEXTS)
    }
    await page.close()
  })

  it('names the units choice of a file that does not state them by its label', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.goto(`${env.server.url}/records`)
    await page
      .locator('#record-file')
      .setInputFiles(path.join(repoRoot, 'tests/fixtures/records/single-column.txt'))
    const units = page.getByRole('radiogroup', { name: 'Units of the file' })
    await units.waitFor()
    await units.getByText('cm/s² (gal)').click()
    expect(await units.getByRole('radio', { name: 'cm/s² (gal)' }).isChecked()).toBe(true)
    await page.close()
  })
})

import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  type Browser,
  type RunningServer,
  artifactPath,
  demoMembers,
  launchBrowser,
  repoRoot,
  signInThroughForm,
  startServer,
} from './harness.js'

const fixture = (name: string) => path.join(repoRoot, 'tests', 'fixtures', 'records', name)

let server: RunningServer
let browser: Browser

beforeAll(async () => {
  server = await startServer()
  browser = await launchBrowser()
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

describe('the record library in the browser', () => {
  it('lists the synthetic demo records with their badge', async () => {
    await browser.context.clearCookies()
    const page = await browser.newPage()
    await signInThroughForm(page, server.url, demoMembers.checker.email)
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Records' }).click()
    await page.waitForURL(/\/records$/)
    const table = page.locator('[data-test="records-table"]')
    await table.getByText('Synthetic far-field noise').waitFor()
    expect(await table.getByText('synthetic', { exact: true }).count()).toBe(5)
    await page.close()
  })

  it('uploads a file, shows it in the table and opens its plot', async () => {
    await browser.context.clearCookies()
    const page = await browser.newPage()
    await signInThroughForm(page, server.url, demoMembers.engineer.email)
    await page.goto(`${server.url}/records`)

    // A file that states its units (header row) and Δt (time column): neither field is asked for.
    await page.locator('#record-file').setInputFiles(fixture('time-value-header.csv'))
    await expect(page.locator('[data-test="record-detected"]').innerText()).resolves.toMatch(
      /time and acceleration columns.*units g.*Δt = 0\.01 s/,
    )
    expect(await page.locator('[data-test="record-units-field"]').count()).toBe(0)
    expect(await page.locator('[data-test="record-dt-field"]').count()).toBe(0)
    await page.getByLabel('Name').fill('Browser upload H1')
    await page.getByLabel('Component').fill('H1')
    await page.locator('[data-test="record-upload"]').click()
    await page.locator('[data-test="record-uploaded"]').waitFor()

    const row = page.locator('[data-test="records-table"] tr', { hasText: 'Browser upload H1' })
    await row.waitFor()
    const cells = await row.locator('td').allInnerTexts()
    expect(cells.join(' | ')).toMatch(/Tidewater Library Annex/)
    expect(cells.join(' | ')).toMatch(/Ines Marlowe/)
    expect(cells.join(' | ')).toMatch(/\b200\b/)
    await page.screenshot({ path: artifactPath('records-table.png'), fullPage: true })

    await row.getByRole('link', { name: 'Browser upload H1' }).click()
    await page.waitForURL(/\/records\/[0-9a-f-]{36}$/)
    const plot = page.locator('[data-test="record-plot"] svg')
    await plot.waitFor()
    const description = await plot.locator('desc').textContent()
    expect(description).toMatch(/200 samples/)
    expect(description).toMatch(/Acceleration.*Velocity.*Displacement/)
    const sha256 = createHash('sha256')
      .update(readFileSync(fixture('time-value-header.csv')))
      .digest('hex')
    expect(await page.locator('[data-test="record-sha256"]').innerText()).toBe(sha256)
    await expect(page.locator('[data-test="record-parameters"]').innerText()).resolves.toMatch(/PGA/)

    // Zoom by the toolbar: the window shown narrows.
    await page.getByRole('button', { name: 'Zoom in' }).click()
    await expect(page.getByText(/Showing 0\.4\d*–1\.4\d* s/).count()).resolves.toBe(1)
    await page.screenshot({ path: artifactPath('record-plot.png'), fullPage: true })
    await page.close()
  })

  it('asks for units and Δt only when the file does not state them, and shows a refusal beside the file with its line', async () => {
    await browser.context.clearCookies()
    const page = await browser.newPage()
    await signInThroughForm(page, server.url, demoMembers.engineer.email)
    await page.goto(`${server.url}/records`)

    await page.locator('#record-file').setInputFiles(fixture('single-column.txt'))
    await page.locator('[data-test="record-units-field"]').waitFor()
    await page.locator('[data-test="record-dt-field"]').waitFor()

    await page.locator('#record-file').setInputFiles(fixture('non-numeric-line7.csv'))
    await page.locator('[data-test="record-units-field"]').waitFor({ state: 'detached' })
    await page.locator('[data-test="record-upload"]').click()
    const message = page.locator('[data-test="record-file-message"]')
    await expect(message.getByText(/Line 7/).waitFor()).resolves.toBeUndefined()
    expect(await message.innerText()).toMatch(/not a number/)
    await page.screenshot({ path: artifactPath('records-refusal.png'), fullPage: true })
    await page.close()
  })
})

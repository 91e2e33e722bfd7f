import { readFileSync } from 'node:fs'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  type Browser,
  type RunningServer,
  artifactPath,
  demoMembers,
  launchBrowser,
  signInThroughForm,
  startServer,
} from './harness.js'
import { pdfFileText } from '../support/exportFiles.js'

let server: RunningServer
let browser: Browser
let page: Page
let runId: string
let recordSha256: string

const CLIENT_HEADER = { 'x-ordinate-client': '1' }

/** Starts a run of the first synthetic demo record through the API, as the signed-in page, and waits for it. */
async function runDemoRecord(p: Page): Promise<string> {
  const records = await (await p.request.get(`${server.url}/api/records`)).json()
  const demo = records.items.find((r: { synthetic: boolean }) => r.synthetic)
  recordSha256 = demo.sha256
  const created = await p.request.post(`${server.url}/api/runs`, {
    headers: CLIENT_HEADER,
    data: { recordId: demo.id, dampingRatios: [0.05] },
  })
  expect(created.status()).toBe(202)
  const { id } = await created.json()
  for (let i = 0; i < 600; i++) {
    const run = await (await p.request.get(`${server.url}/api/runs/${id}`)).json()
    if (run.status === 'succeeded') return id
    if (run.status === 'failed') throw new Error(`the run failed: ${run.error}`)
    await p.waitForTimeout(100)
  }
  throw new Error('the run did not finish within a minute')
}

beforeAll(async () => {
  server = await startServer()
  browser = await launchBrowser()
  page = await browser.newPage()
  await signInThroughForm(page, server.url, demoMembers.engineer.email)
  runId = await runDemoRecord(page)
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

describe('calc-package exports in the browser', () => {
  it('downloads the PDF sheet from the run page', async () => {
    await page.goto(`${server.url}/runs/${runId}`)
    const menu = page.locator('[data-test="export-menu"]')
    await menu.locator('summary').click()
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      menu.locator('[data-test="export-pdf"]').click(),
    ])
    expect(download.suggestedFilename()).toMatch(/^ORD-R-[0-9A-F]{8}-rev1-[a-z0-9-]+\.pdf$/)
    const file = artifactPath('exports-run-sheet.pdf')
    await download.saveAs(file)
    expect(readFileSync(file).subarray(0, 5).toString('latin1')).toBe('%PDF-')
    const text = pdfFileText(file)
    expect(text).toContain(recordSha256)
    expect(text).toMatch(/the\s+locally\s+adopted\s+code\s+and\s+its\s+edition\s+govern\./)
    await page.screenshot({ path: artifactPath('exports-menu.png'), fullPage: true })
  })

  it('offers the PNG at the width the engineer types', async () => {
    await page.goto(`${server.url}/runs/${runId}`)
    const menu = page.locator('[data-test="export-menu"]')
    await menu.locator('summary').click()
    const width = menu.getByLabel('Printed width of the PNG in millimetres')
    await width.fill('90')
    await width.blur()
    const href = new URL(
      (await menu.locator('[data-test="export-png"]').getAttribute('href')) as string,
      server.url,
    )
    expect(href.pathname).toBe(`/api/runs/${runId}/export.png`)
    // The width typed, and the chart as it is on the page (PSA in g, log period axis).
    expect(Object.fromEntries(href.searchParams)).toEqual({
      widthMm: '90',
      quantity: 'PSA',
      unit: 'g',
      xScale: 'log',
      yScale: 'linear',
    })
    await expect(menu.innerText()).resolves.toContain('1063 pixels wide')
  })

  it('shows the print preview of the same sheet, without the app around it when printed', async () => {
    await page.goto(`${server.url}/runs/${runId}/sheet`)
    const sheet = page.locator('[data-test="sheet"]')
    await sheet.waitFor()
    await expect(sheet.locator('[data-test="sheet-title"]').innerText()).resolves.toMatch(
      /^Elastic response spectrum: /,
    )
    await expect(sheet.innerText()).resolves.toContain(recordSha256)
    await expect(sheet.locator('[data-test="sheet-cautions"]').innerText()).resolves.toContain(
      'licensed engineer of record',
    )
    expect(await sheet.locator('svg').count()).toBeGreaterThan(0)
    await page.screenshot({ path: artifactPath('exports-sheet-preview.png'), fullPage: true })
    await page.emulateMedia({ media: 'print' })
    expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false)
    expect(await page.locator('[data-test="export-menu"]').isVisible()).toBe(false)
    await page.screenshot({ path: artifactPath('exports-sheet-print.png'), fullPage: true })
    await page.emulateMedia({ media: 'screen' })
  })

  it('exports a comparison from its page, and previews its sheet with the scale factors', async () => {
    const created = await page.request.post(`${server.url}/api/comparisons`, {
      headers: CLIENT_HEADER,
      data: {
        name: 'Browser export suite',
        runIds: [runId],
        dampingRatio: 0.05,
        target: { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.6, tlS: 8 },
        scaling: { fromS: 0.2, toS: 2, rule: 'lsq-log' },
      },
    })
    expect(created.status()).toBe(201)
    const comparisonId = (await created.json()).comparison.id as string
    await page.goto(`${server.url}/comparisons/${comparisonId}`)
    const menu = page.locator('[data-test="export-menu"]')
    await menu.locator('summary').click()
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      menu.locator('[data-test="export-svg"]').click(),
    ])
    expect(download.suggestedFilename()).toMatch(/^ORD-C-[0-9A-F]{8}-rev1-[a-z0-9-]+\.svg$/)
    await menu.locator('[data-test="export-preview"]').click()
    await page.waitForURL(`${server.url}/comparisons/${comparisonId}/sheet`)
    const sheet = page.locator('[data-test="sheet"]')
    await sheet.waitFor()
    await expect(sheet.locator('[data-test="sheet-title"]').innerText()).resolves.toBe(
      'Suite comparison: Browser export suite',
    )
    await expect(sheet.innerText()).resolves.toContain('Records of the suite and their scale factors')
    await page.screenshot({ path: artifactPath('exports-comparison-sheet.png'), fullPage: true })
  })
})

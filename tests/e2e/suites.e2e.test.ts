import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()

/**
 * A synthetic time–value record stating its units (g) and Δt (0.01 s, from the time column):
 * a decaying sine, invented for the test.
 */
function syntheticRecord(amplitudeG: number, periodS: number, points = 400): string {
  const lines = ['time (s),acceleration (g)']
  for (let i = 0; i < points; i++) {
    const t = i * 0.01
    lines.push(
      `${t.toFixed(2)},${(amplitudeG * Math.exp(-t / 2) * Math.sin((2 * Math.PI * t) / periodS)).toFixed(6)}`,
    )
  }
  return `${lines.join('\n')}\n`
}

const file = (name: string, text: string) => ({ name, mimeType: 'text/plain', buffer: Buffer.from(text) })

/** The same record with a letter O in place of a zero on line 7. */
const badRecord = syntheticRecord(0.2, 0.4).split('\n')
badRecord[6] = '0.05,0.0O3'

async function engineerOn(path: string): Promise<Page> {
  const page = await env.browser.newPage()
  await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
  await page.goto(`${env.server.url}${path}`)
  return page
}

describe('suites in the browser', () => {
  it('uploads 5 dropped files: 4 stored and the bad one refused with its line; accepts a suggested pair', async () => {
    const page = await engineerOn('/records')
    await page
      .locator('[data-test="multi-file-input"]')
      .setInputFiles([
        file('Quay station H1.csv', syntheticRecord(0.3, 0.5)),
        file('Quay station H2.csv', syntheticRecord(0.25, 0.7)),
        file('Pier station X.csv', syntheticRecord(0.15, 0.3)),
        file('Bad quay record.csv', badRecord.join('\n')),
        file('Yard station.csv', syntheticRecord(0.1, 1.1, 300)),
      ])
    const table = page.locator('[data-test="multi-upload-table"]')
    // Each file is read in the browser first; the rows appear once all five are read.
    await table.locator('tbody tr').nth(4).waitFor()
    await expect(table.locator('tbody tr').count()).resolves.toBe(5)
    await page.locator('[data-test="upload-all"]').click()
    await page
      .locator('[data-test="multi-summary"]')
      .getByText('4 stored, 1 refused.')
      .waitFor({ timeout: 60_000 })
    const bad = table.locator('tr[data-file="Bad quay record.csv"]')
    expect(await bad.getAttribute('data-state')).toBe('refused')
    expect(await bad.locator('[data-test="row-refusal"]').innerText()).toMatch(/line 7/i)
    expect(await table.locator('tr[data-state="stored"]').count()).toBe(4)
    await page.screenshot({ path: artifactPath('suites-multi-upload.png'), fullPage: true })

    const suggestion = page.locator('[data-test="pair-suggestion"]', { hasText: 'Quay station H1/H2' })
    await suggestion.waitFor()
    await suggestion.locator('[data-test="accept-pair"]').click()
    await page.locator('[data-test="pair-made"]').waitFor()
    await page.goto(`${env.server.url}/pairs`)
    await page
      .locator('[data-test="pairs-table"]')
      .getByRole('link', { name: 'Quay station H1/H2' })
      .waitFor()
    await page.close()
  })

  it('runs the pair from its page and reads RotD50 on the run page', async () => {
    const page = await engineerOn('/pairs')
    await page.locator('[data-test="pairs-table"]').getByRole('link', { name: 'Quay station H1/H2' }).click()
    await page.locator('[data-test="pair-components"]').getByText('Quay station H1').waitFor()
    await page.locator('[data-test="pair-run-form"]').waitFor()
    await page.screenshot({ path: artifactPath('suites-pair-page.png'), fullPage: true })
    await page.locator('[data-test="start-pair-run"]').click()
    await page.waitForURL(/\/runs\/[^/]+$/)
    const chart = page.locator('figure svg[role="img"]').first()
    await chart.waitFor({ timeout: 60_000 })
    expect(await chart.locator('desc').textContent()).toContain('Quay station H1/H2 (RotD50)')
    await page.close()
  })

  it('runs a batch of two records, watches it finish, and compares it on the four-way log plot', async () => {
    const page = await engineerOn('/records')
    const table = page.locator('[data-test="records-table"]')
    for (const name of ['Pier station X', 'Yard station']) {
      await table.locator('tr', { hasText: name }).locator('.n-checkbox').first().click()
    }
    const form = page.locator('[data-test="batch-run-form"]')
    await expect(form.locator('[data-test="batch-cost"]').innerText()).resolves.toMatch(
      /Needs 2 credits · balance \d+/,
    )
    await form.locator('[data-test="start-batch"]').click()
    await page.getByRole('button', { name: 'Start the runs' }).click()
    await page.waitForURL(/\/batches\/[^/]+$/)
    await page.locator('[data-test="batch-finished"]').waitFor({ timeout: 90_000 })
    await expect(page.locator('[data-test="batch-counts"]').innerText()).resolves.toMatch(/2 of 2/)

    await page.locator('[data-test="chart-kind-tripartite"]').click()
    const plot = page.locator('[data-test="tripartite-chart"] svg')
    await plot.waitFor()
    const svg = await plot.evaluate((el) => el.outerHTML)
    expect(svg).toContain('PSV (cm/s)')
    expect(svg).toMatch(/data-diagonal="SD [\d.]+"/)
    expect(svg).toMatch(/data-diagonal="PSA [\d.]+"/)
    await page.screenshot({ path: artifactPath('suites-batch-tripartite.png'), fullPage: true })

    await page.locator('[data-test="compare-batch"]').click()
    await page.waitForURL(/\/comparisons\/[^/]+$/)
    await page.locator('[data-test="comparison-chart"], figure svg[role="img"]').first().waitFor()
    await page.locator('[data-test="chart-kind-tripartite"]').click()
    await page.locator('[data-test="tripartite-chart"] svg').waitFor()
    expect(await page.locator('[data-test="tripartite-chart"] svg').evaluate((el) => el.outerHTML)).toContain(
      'SD (cm)',
    )
    await page.screenshot({ path: artifactPath('suites-comparison-tripartite.png'), fullPage: true })
    await page.close()
  })

  it('flags a binary file renamed .txt as not a record file before asking for units or Δt', async () => {
    const page = await engineerOn('/records')
    // A word-processor document starts "PK" (a zip); this one also holds NUL bytes.
    const binary = {
      name: 'Site report.txt',
      mimeType: 'text/plain',
      buffer: Buffer.from([0x50, 0x4b, 3, 4, 0, 0, 8, 0]),
    }
    await page.locator('[data-test="multi-file-input"]').setInputFiles([binary])
    const row = page.locator('[data-test="multi-upload-table"] tr[data-file="Site report.txt"]')
    expect(await row.getAttribute('data-state')).toBe('not-record')
    expect(await row.locator('[data-test="not-record"]').innerText()).toMatch(/not a text record file/)
    expect(await row.locator('[data-test="row-units"], [data-test="row-dt"]').count()).toBe(0)
    expect(await page.locator('[data-test="upload-all"]').isDisabled()).toBe(true)

    await page.locator('#record-file').setInputFiles([binary])
    await page
      .locator('[data-test="record-file-message"]')
      .getByText(/not a text record file/)
      .waitFor()
    expect(await page.locator('[data-test="record-units-field"]').count()).toBe(0)
    expect(await page.locator('[data-test="record-upload"]').isDisabled()).toBe(true)
    await page.close()
  })

  it('switches to US customary units and shows inches in the ordinates table', async () => {
    const page = await engineerOn('/account')
    await page.locator('[data-test="units-us"]').click()
    await page.locator('[data-test="save-units"]').click()
    await page.locator('[data-test="units-saved"]').getByText('Saved.').waitFor()

    await page.goto(`${env.server.url}/runs`)
    await page
      .locator('[data-test="runs-table"]')
      .getByRole('link', { name: 'Pier station X' })
      .first()
      .click()
    await page.locator('[data-test="quantity"]').getByText('SD', { exact: true }).click()
    await page.getByText('Ordinates: SD in in', { exact: true }).waitFor()
    await page.screenshot({ path: artifactPath('suites-us-units.png'), fullPage: true })

    // The home page is the firm's workspace now that records exist.
    await page.goto(env.server.url)
    const workspace = page.locator('[data-test="workspace"]')
    await workspace
      .getByRole('region', { name: 'Your recent runs' })
      .getByText('Pier station X')
      .first()
      .waitFor()
    await workspace
      .getByRole('region', { name: 'Recent batches' })
      .getByText(/Batch of 2/)
      .waitFor()
    await page.screenshot({ path: artifactPath('suites-workspace.png'), fullPage: true })
    await page.close()
  })

  it('makes a personal API token shown once, which scripts use until it is revoked', async () => {
    const page = await engineerOn('/account')
    await page.locator('[data-test="token-name"] input').fill('Suite scripts')
    await page.locator('[data-test="create-token"]').click()
    const secret = (await page.locator('[data-test="token-secret"]').innerText()).trim()
    expect(secret).toMatch(/^ordt_/)
    await page.locator('[data-test="tokens-table"]').getByText('Suite scripts').waitFor()
    expect(await page.locator('[data-test="tokens-table"]').innerText()).not.toContain(secret)

    const asScript = () =>
      page.request.get(`${env.server.url}/api/records`, { headers: { Authorization: `Bearer ${secret}` } })
    expect((await asScript()).status()).toBe(200)
    await page.locator('[data-test="revoke-token"]').first().click()
    await page.getByRole('button', { name: 'Revoke', exact: true }).last().click()
    await page.locator('[data-test="tokens-table"]').getByText('No tokens yet.').waitFor()
    expect((await asScript()).status()).toBe(401)

    await page.goto(`${env.server.url}/projects`)
    await page.locator('[data-test="projects-table"]').getByText('Tidewater Library Annex').waitFor()
    // Create, rename and archive a project; the default project offers no archive.
    await page.locator('[data-test="new-project-name"] input').fill('Synthetic pier study')
    await page.locator('[data-test="create-project"]').click()
    const projects = page.locator('[data-test="projects-table"]')
    const row = projects.locator('tr', { hasText: 'Synthetic pier study' })
    await row.locator('[data-test="rename-project"]').click()
    await projects.locator('[data-test="rename-input"] input').fill('Synthetic pier study, phase 2')
    await projects.locator('[data-test="rename-save"]').click()
    const renamed = projects.locator('tr', { hasText: 'Synthetic pier study, phase 2' })
    await renamed.waitFor()
    await renamed.getByRole('button', { name: 'Archive' }).click()
    await page.getByRole('button', { name: 'Archive', exact: true }).last().click()
    await renamed.waitFor({ state: 'detached' })
    await page.getByText('Show archived projects').click()
    await projects.locator('tr', { hasText: 'Synthetic pier study, phase 2' }).getByText('archived').waitFor()
    expect(
      await projects
        .locator('tr', { hasText: 'Tidewater Library Annex' })
        .getByRole('button', { name: 'Archive' })
        .count(),
    ).toBe(0)
    await page.screenshot({ path: artifactPath('suites-projects.png'), fullPage: true })
    await page.close()
  })

  it('refuses a period outside 0.01–20 s as it is typed, keeping Start disabled, and clamps nothing', async () => {
    const page = await engineerOn('/records')
    const list = await page.request.get(`${env.server.url}/api/records`)
    const recordId = ((await list.json()) as { items: Array<{ id: string }> }).items[0]?.id
    await page.goto(`${env.server.url}/runs/new?recordId=${recordId}`)
    await page.getByText('A log-spaced range').click()
    const from = page.locator('[data-test="range-min"] input')
    await from.fill('0.005')
    await page.getByText('From must lie from 0.01 to 20 s.').waitFor()
    expect(await page.locator('[data-test="start-run"]').isDisabled()).toBe(true)
    await from.blur()
    expect(await from.inputValue()).toBe('0.005')
    await from.fill('0.05')
    await page.getByText('From must lie from 0.01 to 20 s.').waitFor({ state: 'detached' })
    expect(await page.locator('[data-test="start-run"]').isDisabled()).toBe(false)
    await page.close()
  })
})

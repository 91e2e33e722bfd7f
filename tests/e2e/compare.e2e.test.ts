import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()
const CLIENT_HEADER = { 'x-ordinate-client': '1' }
const FAR_FIELD = 'Synthetic far-field noise'
const NEAR_FAULT = 'Synthetic near-fault pulse'

/** Runs a demo record through the API as the signed-in page (a small grid, 5%) and waits for it. */
async function runDemo(page: Page, recordName: string): Promise<string> {
  const records = (await (await page.request.get(`${env.server.url}/api/records`)).json()) as {
    items: { id: string; name: string }[]
  }
  const record = records.items.find((r) => r.name === recordName)
  if (!record) throw new Error(`no demo record named ${recordName}`)
  const created = await page.request.post(`${env.server.url}/api/runs`, {
    headers: CLIENT_HEADER,
    data: { recordId: record.id, dampingRatios: [0.05], periodGrid: { minS: 0.05, maxS: 5, count: 60 } },
  })
  expect(created.status()).toBe(202)
  const { id } = (await created.json()) as { id: string }
  for (let i = 0; i < 600; i++) {
    const run = (await (await page.request.get(`${env.server.url}/api/runs/${id}`)).json()) as {
      status: string
      error: string | null
    }
    if (run.status === 'succeeded') return id
    if (run.status === 'failed') throw new Error(`the run failed: ${run.error}`)
    await page.waitForTimeout(100)
  }
  throw new Error('the run did not finish within a minute')
}

describe('comparing and checking in the browser', () => {
  it('the checker overlays two demo runs against a target and returns one with a comment', async () => {
    // The engineer's work, made through the API: two runs of demo records, one submitted for checking.
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    const farFieldRun = await runDemo(page, FAR_FIELD)
    await runDemo(page, NEAR_FAULT)
    const submitted = await page.request.post(`${env.server.url}/api/reviews`, {
      headers: CLIENT_HEADER,
      data: { subjectType: 'run', subjectId: farFieldRun },
    })
    expect(submitted.status()).toBe(201)

    // The checker overlays both runs against an ASCE 7-16 target, scaled over 0.2–2 s.
    await signInThroughForm(page, env.server.url, demoMembers.checker.email)
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Comparisons' }).click()
    await page.locator('[data-test="new-comparison"]').click()
    await page.waitForURL(/\/comparisons\/new$/)
    await page
      .locator('[data-test="comparison-name"] input')
      .fill('Far-field and near-fault against the site spectrum')
    await page.locator('[data-test="comparison-runs"]').click()
    await page.locator('.n-base-select-option').filter({ hasText: FAR_FIELD }).click()
    await page.locator('.n-base-select-option').filter({ hasText: NEAR_FAULT }).click()
    await page.keyboard.press('Escape')
    await expect(page.locator('[data-test="comparison-damping"]').innerText()).resolves.toContain('5%')
    await page.locator('[data-test="target-asce"]').click()
    await expect
      .poll(() => page.locator('[data-test="target-label"]').innerText(), { timeout: 10_000 })
      .toMatch(/ASCE 7-16 §11.4.6 two-period design: SDS = 1 g, SD1 = 0.6 g, TL = 8 s/)
    await page.locator('[data-test="scaling-on"]').click()

    const chart = page.locator('[data-test="comparison-chart"] svg')
    await expect
      .poll(() => chart.locator('text').allTextContents(), { timeout: 15_000 })
      .toEqual(expect.arrayContaining([expect.stringMatching(/^ASCE 7-16/), '90% of the target']))
    const legend = (await chart.locator('text').allTextContents()).join(' | ')
    expect(legend).toContain(FAR_FIELD)
    expect(legend).toContain(NEAR_FAULT)
    expect(legend).toMatch(/Arithmetic mean/)
    // Long legend entries wrap onto more lines; their values are never cut off.
    expect((await chart.locator('text').allTextContents()).join(' ')).toMatch(/SD1 = 0\.6 g, TL = 8 s/)
    expect(legend).not.toContain('…')
    // One suite factor that keeps the mean at or above 90% of the target passes by construction.
    const check = page.locator('[data-test="suite-check"]')
    await expect.poll(() => check.getAttribute('data-passed'), { timeout: 10_000 }).toBe('true')
    const factors = await page.locator('[data-test="scale-factor"]').allInnerTexts()
    expect(factors).toHaveLength(2)
    expect(factors[0]).toBe(factors[1])
    await page.screenshot({ path: artifactPath('compare-workspace.png'), fullPage: true })
    await page.locator('[data-test="comparison-save"]').click()
    await page.waitForURL(/\/comparisons\/[0-9a-f-]{36}$/)
    await expect(page.locator('[data-test="review-state"]').first().innerText()).resolves.toBe('Draft')

    // The checker's queue holds the engineer's submitted run; the checker returns it with a comment.
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Checking' }).click()
    const queue = page.locator('[data-test="review-queue"]')
    await queue.getByRole('link', { name: FAR_FIELD }).click()
    await page.waitForURL(new RegExp(`/runs/${farFieldRun}$`))
    const panel = page.locator('[data-test="review-panel"]')
    await expect.poll(() => panel.locator('[data-test="review-state"]').innerText()).toBe('Awaiting check')
    const comment = 'The record ends abruptly at 40 s; add a taper and re-run before it goes in the suite.'
    await panel.locator('[data-test="review-comment"] textarea').fill(comment)
    await panel.locator('[data-test="review-return"]').click()
    await expect.poll(() => panel.locator('[data-test="review-state"]').innerText()).toBe('Returned')
    await expect(panel.locator('[data-test="review-thread"]').innerText()).resolves.toContain(comment)
    await page.screenshot({ path: artifactPath('compare-returned-run.png'), fullPage: true })

    // The engineer sees it returned among their submissions, with the checker's comment.
    const mine = (await (await page.request.get(`${env.server.url}/api/reviews?state=returned`)).json()) as {
      items: { subjectId: string; decidedBy: { name: string } }[]
    }
    expect(mine.items.map((r) => r.subjectId)).toContain(farFieldRun)
    await page.close()
  })
})

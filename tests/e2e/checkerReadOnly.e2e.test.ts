import { describe, expect, it } from 'vitest'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()
const CLIENT_HEADER = { 'x-ordinate-client': '1' }

/**
 * Issue 12, defect 1: the work a checker signs off stays its author's. The page shows an
 * engineer's comparison read-only to a checker, before and after the checker returns it.
 */
describe("a checker and an engineer's comparison", () => {
  it('shows the checker read-only inputs and no save button, before and after returning it', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    const runs = (await (await page.request.get(`${env.server.url}/api/runs`)).json()) as {
      items: { id: string; status: string; recordId: string | null }[]
    }
    let runId = runs.items.find((r) => r.status === 'succeeded' && r.recordId)?.id
    if (!runId) {
      const records = (await (await page.request.get(`${env.server.url}/api/records`)).json()) as {
        items: { id: string }[]
      }
      const created = await page.request.post(`${env.server.url}/api/runs`, {
        headers: CLIENT_HEADER,
        data: { recordId: records.items[0]!.id, periodGrid: { minS: 0.05, maxS: 5, count: 40 } },
      })
      runId = ((await created.json()) as { id: string }).id
      for (let i = 0; i < 600; i++) {
        const run = (await (await page.request.get(`${env.server.url}/api/runs/${runId}`)).json()) as {
          status: string
        }
        if (run.status === 'succeeded') break
        await page.waitForTimeout(100)
      }
    }
    const made = await page.request.post(`${env.server.url}/api/comparisons`, {
      headers: CLIENT_HEADER,
      data: { name: 'Engineer’s suite for checking', runIds: [runId], dampingRatio: 0.05 },
    })
    expect(made.status()).toBe(201)
    const comparisonId = ((await made.json()) as { comparison: { id: string } }).comparison.id

    await signInThroughForm(page, env.server.url, demoMembers.checker.email)
    await page.goto(`${env.server.url}/comparisons/${comparisonId}`)
    const note = page.locator('[data-test="comparison-read-only"]')
    await note.waitFor()
    await expect(note.innerText()).resolves.toMatch(/checker changes only work they made/)
    await expect(page.locator('[data-test="comparison-form"]').getAttribute('aria-readonly')).resolves.toBe(
      'true',
    )
    await expect(page.getByRole('button', { name: 'Save changes' }).count()).resolves.toBe(0)

    // The engineer submits it and the checker returns it: still read-only to the checker.
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    const submitted = await page.request.post(`${env.server.url}/api/reviews`, {
      headers: CLIENT_HEADER,
      data: { subjectType: 'comparison', subjectId: comparisonId },
    })
    expect(submitted.status()).toBe(201)
    const reviewId = ((await submitted.json()) as { id: string }).id
    await signInThroughForm(page, env.server.url, demoMembers.checker.email)
    const returned = await page.request.post(`${env.server.url}/api/reviews/${reviewId}/decision`, {
      headers: CLIENT_HEADER,
      data: { decision: 'returned', comment: 'Add the second record.' },
    })
    expect(returned.status()).toBe(200)
    await page.goto(`${env.server.url}/comparisons/${comparisonId}`)
    await page.locator('[data-test="comparison-read-only"]').waitFor()
    await expect(page.getByRole('button', { name: 'Save changes' }).count()).resolves.toBe(0)
    await page.screenshot({ path: artifactPath('checker-read-only-comparison.png'), fullPage: true })
    await page.close()
  })
})

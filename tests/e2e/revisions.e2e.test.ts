import { describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()

async function api(page: Page, method: 'GET' | 'POST', path: string, data?: unknown) {
  const res = await page.request.fetch(`${env.server.url}${path}`, {
    method,
    headers: { 'x-ordinate-client': '1' },
    ...(data === undefined ? {} : { data }),
  })
  const body: unknown = res.status() === 204 ? undefined : await res.json()
  if (res.status() >= 400) throw new Error(`${method} ${path}: ${res.status()} ${JSON.stringify(body)}`)
  return body as Record<string, unknown>
}

describe('revisions of checked runs', () => {
  it('offers a checked run for re-running, and the new run is its next revision', async () => {
    await env.browser.context.clearCookies()
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    const records = (await api(page, 'GET', '/api/records')) as { items: { id: string; name: string }[] }
    const record = records.items.find((r) => r.name === 'Synthetic far-field noise')!
    const run = await api(page, 'POST', '/api/runs', {
      recordId: record.id,
      dampingRatios: [0.05],
      periodGrid: { minS: 0.1, maxS: 1, count: 5 },
    })
    let status: unknown
    for (let i = 0; i < 240 && status !== 'succeeded'; i++) {
      if (i > 0) await page.waitForTimeout(250)
      status = (await api(page, 'GET', `/api/runs/${String(run.id)}`)).status
      if (status === 'failed') throw new Error('run failed')
    }
    expect(status, 'the run finishes within 60 s').toBe('succeeded')
    const review = await api(page, 'POST', '/api/reviews', { subjectType: 'run', subjectId: run.id })

    await signInThroughForm(page, env.server.url, demoMembers.checker.email)
    await api(page, 'POST', `/api/reviews/${String(review.id)}/decision`, { decision: 'checked' })

    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.goto(`${env.server.url}/runs/${String(run.id)}`)
    const offer = page.locator('[data-test="new-revision"]')
    await offer.waitFor()
    await expect(offer.innerText()).resolves.toMatch(/checked and locked \(revision 1\)/)
    await offer.getByRole('link', { name: 'Re-run it as revision 2' }).click()

    const form = page.locator('[data-test="new-run-form"]')
    await form.waitFor()
    await expect(form.locator('h2').innerText()).resolves.toBe('New run: revision 2')
    await page.screenshot({ path: artifactPath('revision-new-run-form.png'), fullPage: true })
    await form.locator('[data-test="start-run"]').click()
    await page.waitForURL(
      (url) => /\/runs\/[0-9a-f-]+$/.test(url.pathname) && !url.pathname.endsWith(String(run.id)),
    )
    const newId = page.url().split('/').at(-1)!
    const revised = await api(page, 'GET', `/api/runs/${newId}`)
    expect(revised.revisionOf).toBe(run.id)
    expect(revised.revision).toBe(2)
  })
})

import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

/**
 * The built app under its own security headers: helmet's content security policy is sent and
 * the pages work under it (no violation reported), and markup in a record name or a review
 * comment is shown as text everywhere it appears (lists, pages, the charts drawn with v-html,
 * the sheet, the review thread).
 */
const SESSION_SECRET = 'hardening-session-secret-4f8a1c93e2'
const env = useBrowserTestEnvironment({ SESSION_SECRET })

/** Markup that would run, or at least make an element, if any page put the name in as HTML. */
const HOSTILE_NAME = '<img src=x onerror="window.__xss=1"><b id="injected">Quay</b>'
/** The same for a review comment. */
const HOSTILE_COMMENT = 'See <img src=x onerror="window.__xss=2"><i id="injected-comment">line 3</i>'

/** Records CSP violations (on every later navigation of the page) and console errors. */
async function watch(page: Page) {
  const problems: string[] = []
  page.on('console', (m) => {
    if (m.type() === 'error' || /Content[- ]Security[- ]Policy/i.test(m.text()))
      problems.push(`console: ${m.text()}`)
  })
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`))
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      const w = window as unknown as { __csp?: string[] }
      ;(w.__csp ??= []).push(
        `${e.violatedDirective} blocked ${e.blockedURI || 'inline'} at ${e.sourceFile}:${e.lineNumber}:${e.columnNumber} ${e.sample}`,
      )
    })
  })
  return problems
}

async function violations(page: Page): Promise<string[]> {
  return page.evaluate(() => (window as unknown as { __csp?: string[] }).__csp ?? [])
}

/** Opens a path, waits until the app has fetched and drawn it, and answers what went wrong. */
async function visit(page: Page, path: string): Promise<string[]> {
  await page.goto(`${env.server.url}${path}`, { waitUntil: 'networkidle' })
  await page.locator('#app').first().waitFor()
  return violations(page)
}

/** The parts of API answers this test reads. */
interface ApiBody {
  id: string
  status: string
  comparison: { id: string }
}

/** The API as the signed-in page calls it (same cookies), with the client header. */
async function api(page: Page, method: 'GET' | 'POST', path: string, data?: unknown) {
  const res = await page.request.fetch(`${env.server.url}/api${path}`, {
    method,
    headers: { 'x-ordinate-client': '1' },
    ...(data instanceof Object && 'multipart' in data ? (data as object) : data ? { data } : {}),
  })
  return { status: res.status(), body: (await res.json()) as ApiBody }
}

describe('security headers', () => {
  it('sends a content security policy without inline or eval scripts, and helmet’s other headers', async () => {
    const res = await fetch(`${env.server.url}/`)
    const csp = res.headers.get('content-security-policy') ?? ''
    const directives = new Map(
      csp.split(';').map((d) => {
        const [name, ...values] = d.trim().split(/\s+/)
        return [name!, values] as const
      }),
    )
    expect(directives.get('default-src')).toEqual(["'self'"])
    // Scripts from this origin only; WebAssembly may compile (the engine's kernel), JavaScript may not be eval'd.
    expect(directives.get('script-src')?.filter((v) => v !== "'wasm-unsafe-eval'")).toEqual(["'self'"])
    expect(directives.get('script-src-attr')).toEqual(["'none'"])
    expect(directives.get('object-src')).toEqual(["'none'"])
    expect(directives.get('frame-ancestors')).toEqual(["'none'"])
    expect(res.headers.get('x-content-type-options')).toBe('nosniff')
    expect(res.headers.get('referrer-policy')).toBe('no-referrer')
    expect(res.headers.get('x-powered-by')).toBeNull()
    const apiRes = await fetch(`${env.server.url}/api/health`)
    expect(apiRes.headers.get('content-security-policy')).toBe(csp)
  })
})

describe('the built app under its content security policy', () => {
  let runId = ''
  let recordId = ''
  let comparisonId = ''

  it('loads every main page for an engineer with no CSP violation and no console error', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    const problems = await watch(page)

    // Something to show on every page: a record with a hostile name, a finished run of it and a comparison.
    const upload = await api(page, 'POST', '/records', {
      multipart: {
        name: HOSTILE_NAME,
        units: 'g',
        dtS: '0.01',
        file: {
          name: 'hostile.txt',
          mimeType: 'text/plain',
          buffer: Buffer.from(
            Array.from({ length: 400 }, (_, i) =>
              (0.2 * Math.sin(i / 5) * Math.exp(-i / 150)).toFixed(5),
            ).join('\n'),
          ),
        },
      },
    })
    expect(upload.status, JSON.stringify(upload.body)).toBe(201)
    recordId = upload.body.id
    const run = await api(page, 'POST', '/runs', { recordId })
    expect(run.status).toBe(202)
    runId = run.body.id
    await expect
      .poll(async () => (await api(page, 'GET', `/runs/${runId}`)).body.status, { timeout: 60_000 })
      .toBe('succeeded')
    const comparison = await api(page, 'POST', '/comparisons', {
      name: HOSTILE_NAME,
      runIds: [runId],
      dampingRatio: 0.05,
    })
    expect(comparison.status, JSON.stringify(comparison.body)).toBe(201)
    comparisonId = comparison.body.comparison.id
    const review = await api(page, 'POST', '/reviews', { subjectType: 'run', subjectId: runId })
    expect(review.status, JSON.stringify(review.body)).toBe(201)
    const comment = await api(page, 'POST', `/reviews/${review.body.id}/comments`, { body: HOSTILE_COMMENT })
    expect(comment.status, JSON.stringify(comment.body)).toBe(201)

    for (const path of [
      '/',
      '/records',
      `/records/${recordId}`,
      '/runs',
      '/runs/new',
      `/runs/${runId}`,
      `/runs/${runId}/sheet`,
      '/comparisons',
      '/comparisons/new',
      `/comparisons/${comparisonId}`,
      `/comparisons/${comparisonId}/sheet`,
      '/reviews',
      '/credits',
    ]) {
      expect(await visit(page, path), path).toEqual([])
    }
    await page.screenshot({ path: artifactPath('security-engineer-last-page.png'), fullPage: true })
    expect(problems).toEqual([])
    await page.close()
  })

  it('loads the admin pages (members, and credits with the card form) with no violation', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.admin.email)
    const problems = await watch(page)
    for (const path of ['/members', '/credits']) expect(await visit(page, path), path).toEqual([])
    expect(problems).toEqual([])
    await page.close()
  })

  it('loads the signed-out pages with no violation', async () => {
    await env.browser.context.clearCookies()
    const page = await env.browser.newPage()
    const problems = await watch(page)
    for (const path of ['/sign-in', '/reset-password', '/dev/mailbox', '/no-such-page']) {
      expect(await visit(page, path), path).toEqual([])
    }
    // A signed-out visit to an app page asks the API who is signed in and is told 401: expected.
    expect(problems.filter((p) => !/401 \(Unauthorized\)/.test(p))).toEqual([])
    await page.close()
  })

  it('shows markup in a record name as text on every page that names it, creating no element', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    for (const path of [
      '/records',
      `/records/${recordId}`,
      '/runs',
      `/runs/${runId}`,
      `/runs/${runId}/sheet`,
      '/comparisons',
      `/comparisons/${comparisonId}`,
      `/comparisons/${comparisonId}/sheet`,
      '/reviews',
    ]) {
      await visit(page, path)
      await expect(
        page.getByText(HOSTILE_NAME, { exact: false }).first().waitFor(),
        path,
      ).resolves.toBeUndefined()
      const injected = await page.evaluate(() => ({
        images: document.querySelectorAll('img[src="x"]').length,
        bold: document.querySelectorAll('#injected').length,
        ran: (window as unknown as { __xss?: number }).__xss ?? null,
      }))
      expect(injected, path).toEqual({ images: 0, bold: 0, ran: null })
    }
    await page.screenshot({ path: artifactPath('security-hostile-name.png'), fullPage: true })
    await page.close()
  })

  it('shows markup in a review comment as text in the thread, creating no element', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.checker.email)
    await visit(page, `/runs/${runId}`)
    const thread = page.locator('[data-test="review-thread"]')
    await thread.getByText(HOSTILE_COMMENT).waitFor()
    const injected = await page.evaluate(() => ({
      images: document.querySelectorAll('img[src="x"]').length,
      italic: document.querySelectorAll('#injected-comment').length,
      ran: (window as unknown as { __xss?: number }).__xss ?? null,
    }))
    expect(injected).toEqual({ images: 0, italic: 0, ran: null })
    await page.close()
  })

  it('never printed the session secret or a demo password to the server log', () => {
    expect(env.server.output().length).toBeGreaterThan(0)
    expect(env.server.output()).not.toContain(SESSION_SECRET)
    expect(env.server.output()).not.toContain('ordinate-demo')
  })
})

import type { Page, Request } from 'playwright-core'
import { describe, expect, it, vi } from 'vitest'
import { creditPacks } from '../../shared/credits/creditPacks.js'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

// No STRIPE_* settings: the server starts stripe-stateful-mock in-process, as on a fresh machine.
const env = useBrowserTestEnvironment()

const small = creditPacks[0]

/**
 * Chooses a test card, buys the chosen pack, confirms the charge with the keyboard, and waits for
 * the server's answer and then the outcome. Each step is checked before the next, and a wrong or
 * missing outcome fails with the text the page shows (a CI run once timed out here with nothing
 * to go on).
 */
async function buyWithTestCard(page: Page, card: string, outcome: RegExp) {
  const choice = page.locator('[data-test="test-card"]', { hasText: card })
  await choice.click()
  await vi.waitFor(async () => expect(await choice.locator('input').isChecked()).toBe(true), {
    timeout: 10_000,
  })
  // The confirmation is a step inside the form, with no fade-out: it is there or it is not.
  await page.locator('[data-test="buy-credits"]:not([disabled])').click()
  const confirm = page.locator('[data-test="purchase-confirm"]')
  await expect(confirm.innerText()).resolves.toMatch(/Charge .* run credits\?/)
  // The Charge button takes the focus, so a keyboard user confirms with Enter.
  await vi.waitFor(
    async () =>
      expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe(
        'charge-card',
      ),
    { timeout: 5_000 },
  )
  const requests: string[] = []
  const seen = (r: Request) => {
    if (r.url().includes('/api/')) requests.push(`${r.method()} ${new URL(r.url()).pathname}`)
  }
  page.on('request', seen)
  const answered = page.waitForResponse(
    (r) => r.request().method() === 'POST' && new URL(r.url()).pathname === '/api/credits/purchases',
    { timeout: 40_000 },
  )
  await page.keyboard.press('Enter')
  await confirm.waitFor({ state: 'detached', timeout: 5_000 })
  await answered
  const shown = page.locator('[data-test="purchase-outcome"]')
  await vi.waitFor(
    async () => {
      const text = (await shown.count()) > 0 ? await shown.innerText() : '(no outcome shown)'
      expect(text, `requests since the confirm: ${requests.join(', ') || 'none'}`).toMatch(outcome)
    },
    // Beyond the server's 30 s payment timeout, so a slow payment server shows its own message.
    { timeout: 40_000, interval: 250 },
  )
  page.off('request', seen)
}

describe('the credits page', () => {
  it(
    'lets the admin buy a pack with a test card, and the balance goes up by its credits',
    { timeout: 120_000 },
    async () => {
      expect(env.server.output()).toMatch(
        /Payments: test mode, through in-process Stripe mock at http:\/\/127\.0\.0\.1:\d+/,
      )
      const page = await env.browser.newPage()
      await signInThroughForm(page, env.server.url, demoMembers.admin.email)
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Credits' }).click()
      await page.waitForURL((u) => u.pathname === '/credits')

      await expect(page.locator('[data-test="test-mode-banner"]').innerText()).resolves.toMatch(/TEST MODE/)
      const balance = page.locator('[data-test="credit-balance"]')
      await expect(balance.innerText()).resolves.toBe('25')

      // naive-ui hides the native radio inputs; a person clicks the visible choice.
      await page.locator('[data-test="pack-choice"]', { hasText: small.name }).click()
      await buyWithTestCard(page, 'test card: succeeds', /Bought 10 run credits/)
      await page.waitForFunction(
        () => document.querySelector('[data-test="credit-balance"]')?.textContent === '35',
      )
      expect(await page.locator('[data-test="ledger-table"]').innerText()).toContain('Credits bought')
      expect(await page.locator('[data-test="purchase-history"]').innerText()).toMatch(/paid/)
      await page.screenshot({ path: artifactPath('credits-admin-bought.png'), fullPage: true })

      await buyWithTestCard(page, 'declined (insufficient funds)', /insufficient funds/)
      expect(await balance.innerText()).toBe('35')
      expect(await page.locator('[data-test="purchase-history"]').innerText()).toMatch(/declined/)
      await page.screenshot({ path: artifactPath('credits-admin-declined.png'), fullPage: true })
      await page.getByRole('button', { name: 'Sign out' }).click()
      await page.waitForURL(/\/sign-in/)
      await page.close()
    },
  )

  it('shows an engineer the balance and who can buy, with no card form', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.engineer.email)
    await page.goto(`${env.server.url}/credits`)
    await page.locator('[data-test="credit-balance"]').waitFor()
    await page.locator('[data-test="ledger-table"]').waitFor()
    expect(await page.getByText('Only your firm’s admin can buy credits.').isVisible()).toBe(true)
    expect(await page.locator('[data-test="buy-credits"]').count()).toBe(0)
    expect(await page.locator('[data-test="purchase-history"]').count()).toBe(0)
    await page.screenshot({ path: artifactPath('credits-engineer.png'), fullPage: true })
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/sign-in/)
    await page.close()
  })
})

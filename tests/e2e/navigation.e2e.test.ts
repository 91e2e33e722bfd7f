import { describe, expect, it } from 'vitest'
import { navigationFor } from '../../src/navigation.js'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

const env = useBrowserTestEnvironment()

describe('navigation by role', () => {
  it('sends a signed-out visitor to sign-in, keeping where they were going', async () => {
    const page = await env.browser.newPage()
    await page.goto(`${env.server.url}/`)
    await page.waitForURL((u) => u.pathname === '/sign-in' && u.searchParams.get('next') === '/')
    await expect(page.getByRole('heading', { name: 'Sign in' }).isVisible()).resolves.toBe(true)
    await page.screenshot({ path: artifactPath('navigation-signed-out.png'), fullPage: true })
    await page.close()
  })

  it('shows the server message when the password is wrong', async () => {
    const page = await env.browser.newPage()
    await page.goto(`${env.server.url}/sign-in`)
    await page.getByLabel('E-mail').fill(demoMembers.engineer.email)
    await page.getByLabel('Password').fill('not-the-password')
    await page.getByRole('button', { name: 'Sign in' }).click()
    const alert = page.locator('[data-test="form-message"]')
    await alert.waitFor()
    expect(await alert.innerText()).toMatch(/not correct/)
    expect(new URL(page.url()).pathname).toBe('/sign-in')
    await page.close()
  })

  for (const [name, member] of Object.entries(demoMembers)) {
    it(`shows the ${name} exactly the entries the ${name} role may use`, async () => {
      const page = await env.browser.newPage()
      await signInThroughForm(page, env.server.url, member.email)
      const nav = page.getByRole('navigation', { name: 'Main' })
      const shown = (await nav.getByRole('link').allInnerTexts()).map((t) => t.trim())
      expect(shown).toEqual(navigationFor(member.roles).map((e) => e.label))
      expect(await page.locator('[data-test="member-roles"]').innerText()).toMatch(
        new RegExp(member.roles.join('|'), 'i'),
      )
      expect(await page.locator('[data-test="caution"]').innerText()).toContain('licensed engineer of record')
      await page.screenshot({ path: artifactPath(`navigation-${name}.png`), fullPage: true })
      await page.getByRole('button', { name: 'Sign out' }).click()
      await page.waitForURL(/\/sign-in/)
      await page.close()
    })
  }

  it('returns a member to the page asked for after signing in', async () => {
    const page = await env.browser.newPage()
    await page.goto(`${env.server.url}/?from=mail`)
    await page.waitForURL((u) => u.pathname === '/sign-in' && u.searchParams.get('next') === '/?from=mail')
    await page.getByLabel('E-mail').fill(demoMembers.checker.email)
    await page.getByLabel('Password').fill('ordinate-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL((u) => u.pathname === '/' && u.search === '?from=mail')
    await page.getByRole('navigation', { name: 'Main' }).waitFor()
    await page.close()
  })
})

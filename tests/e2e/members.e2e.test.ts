import { describe, expect, it } from 'vitest'
import { artifactPath, demoMembers, signInThroughForm, useBrowserTestEnvironment } from './harness.js'

// No SMTP_URL: the server starts its local SMTP sink and the development mailbox.
const env = useBrowserTestEnvironment()

describe('inviting a member by e-mail', () => {
  it('admin invites, the mail arrives in the dev mailbox, the invitee accepts and lands signed in', async () => {
    const page = await env.browser.newPage()
    await signInThroughForm(page, env.server.url, demoMembers.admin.email)

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Members' }).click()
    await page.getByRole('heading', { name: 'Members', level: 1 }).waitFor()
    const table = page.locator('[data-test="members-table"]')
    await table.getByText('checker@ordinate.test').waitFor()
    expect(await table.locator('tbody tr').count()).toBe(3)

    await page.getByLabel('E-mail').fill('joiner@ordinate.test')
    await page.locator('[data-test="invite-roles-checker"]').click()
    await page.locator('[data-test="send-invitation"]').click()
    await page.locator('[data-test="invitations-table"]').getByText('joiner@ordinate.test').waitFor()
    await page.screenshot({ path: artifactPath('members-invited.png'), fullPage: true })

    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/sign-in/)

    await page.goto(`${env.server.url}/dev/mailbox`)
    await page.getByRole('heading', { name: 'Development mailbox' }).waitFor()
    const subject = page.getByText('Ruth Okonkwo-Baines invited you to Halvorsen Kade Structural on Ordinate')
    await subject.waitFor({ timeout: 15_000 })
    await page.screenshot({ path: artifactPath('dev-mailbox.png'), fullPage: true })
    await page.locator('[data-test="mail-link"]').first().click()

    await page.waitForURL((u) => u.pathname.startsWith('/invitations/'))
    await page.getByText('joiner@ordinate.test').waitFor()
    await page.getByLabel('Your name').fill('Joss Arkwright')
    await page.getByLabel('Choose a password').fill('joiner-password-2031')
    await page.getByLabel('Repeat the password').fill('joiner-password-2031')
    await page.getByRole('button', { name: 'Accept and sign in' }).click()

    await page.getByRole('navigation', { name: 'Main' }).waitFor()
    expect(await page.locator('[data-test="member-name"]').innerText()).toBe('Joss Arkwright')
    expect(await page.locator('[data-test="member-roles"]').innerText()).toMatch(/engineer/i)
    expect(await page.locator('[data-test="member-roles"]').innerText()).toMatch(/checker/i)
    expect(await page.locator('[data-test="firm-name"]').innerText()).toBe('Halvorsen Kade Structural')
    await page.screenshot({ path: artifactPath('invitation-accepted.png'), fullPage: true })
    await page.close()
  })
})

import type { Role } from '../../shared/schemas/accounts.js'

const PRODUCT = 'Ordinate'

const HTML_ESCAPES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
}

/** Escapes a value for HTML text or a quoted attribute. Every interpolated value goes through it. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => HTML_ESCAPES[c] ?? c)
}

export interface MailContent {
  subject: string
  text: string
  html: string
}

interface Layout {
  subject: string
  /** Paragraphs of plain text; each is escaped for the HTML part. */
  paragraphs: string[]
  action: { label: string; url: string }
  footer: string
}

/**
 * Plain text and a matching, deliberately plain HTML part: no images, no remote resources and
 * no tracking parameters, so opening the message tells nobody anything.
 */
function render({ subject, paragraphs, action, footer }: Layout): MailContent {
  const text = [...paragraphs, `${action.label}:\n${action.url}`, `-- \n${footer}`].join('\n\n') + '\n'
  const p = (s: string) => `<p style="margin:0 0 16px">${escapeHtml(s)}</p>`
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="font-family:sans-serif;font-size:15px;line-height:1.5;color:#1d2a33;max-width:560px;margin:24px auto;padding:0 16px">
<p style="margin:0 0 24px;font-weight:600;letter-spacing:0.04em">${escapeHtml(PRODUCT)}</p>
${paragraphs.map(p).join('\n')}
<p style="margin:24px 0"><a href="${escapeHtml(action.url)}" style="color:#0b5f7a;font-weight:600">${escapeHtml(action.label)}</a></p>
<p style="margin:0 0 16px;font-size:13px;color:#52606b">If the link does not open, copy this address into your browser:<br>${escapeHtml(action.url)}</p>
<hr style="border:none;border-top:1px solid #d5dde3;margin:24px 0">
<p style="margin:0;font-size:13px;color:#52606b">${escapeHtml(footer)}</p>
</body></html>
`
  return { subject, text, html }
}

const ROLE_LABELS: Record<Role, string> = { engineer: 'engineer', checker: 'checker', admin: 'admin' }

function listRoles(roles: Role[]): string {
  const names = roles.map((r) => ROLE_LABELS[r])
  return names.length <= 1 ? (names[0] ?? '') : `${names.slice(0, -1).join(', ')} and ${names.at(-1)}`
}

function formatUtc(ms: number): string {
  return `${new Date(ms).toISOString().slice(0, 16).replace('T', ' ')} UTC`
}

export function invitationMail(input: {
  firmName: string
  inviterName: string
  roles: Role[]
  url: string
  expiresAt: number
}): MailContent {
  return render({
    subject: `${input.inviterName} invited you to ${input.firmName} on ${PRODUCT}`,
    paragraphs: [
      `${input.inviterName} invited you to join ${input.firmName} on ${PRODUCT}, as ${listRoles(input.roles)}.`,
      `Choose your name and a password to accept. The link works once and expires on ${formatUtc(input.expiresAt)}.`,
      'If you did not expect this invitation, ignore this message and nothing will happen.',
    ],
    action: { label: 'Accept the invitation', url: input.url },
    footer: `${PRODUCT}: response spectra for structural and earthquake engineers. Sent because an admin of ${input.firmName} invited this address.`,
  })
}

export function passwordResetMail(input: { name: string; url: string; expiresAt: number }): MailContent {
  return render({
    subject: `Reset your ${PRODUCT} password`,
    paragraphs: [
      `Hello ${input.name},`,
      `Someone asked to reset the password of your ${PRODUCT} account. If it was you, choose a new password with the link below. It works once and expires on ${formatUtc(input.expiresAt)}.`,
      'If it was not you, ignore this message: your password stays as it is.',
    ],
    action: { label: 'Choose a new password', url: input.url },
    footer: `${PRODUCT}: response spectra for structural and earthquake engineers. Sent because a password reset was requested for this address.`,
  })
}

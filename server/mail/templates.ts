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

/** What happened to a piece of work in checking, for the people who act next. */
export type ReviewNotice = 'submitted' | 'returned' | 'checked'

/**
 * A review notice: submitted work goes to the firm's checkers; returned or checked work goes
 * back to the engineer who submitted it. The comment, when there is one, is quoted in full.
 */
export function reviewNoticeMail(input: {
  notice: ReviewNotice
  recipientName: string
  actorName: string
  firmName: string
  /** "run" or "comparison", and its name. */
  subjectKind: string
  subjectName: string
  revision: number
  comment?: string
  url: string
}): MailContent {
  const work = `the ${input.subjectKind} “${input.subjectName}” (revision ${input.revision})`
  const lines: Record<ReviewNotice, { subject: string; says: string; next: string; label: string }> = {
    submitted: {
      subject: `${input.actorName} submitted ${input.subjectKind} “${input.subjectName}” for checking`,
      says: `${input.actorName} submitted ${work} for checking.`,
      next: 'Any checker of the firm who did not make or run part of it may mark it checked or return it with comments.',
      label: 'Open the work to check it',
    },
    returned: {
      subject: `${input.actorName} returned ${input.subjectKind} “${input.subjectName}” with comments`,
      says: `${input.actorName} returned ${work} with comments.`,
      next: 'Change it and submit it again; each change to returned work makes a new revision.',
      label: 'Open the work and its review thread',
    },
    checked: {
      subject: `${input.actorName} checked ${input.subjectKind} “${input.subjectName}”`,
      says: `${input.actorName} marked ${work} checked. It is now locked; any change is made as a new revision.`,
      next: 'Its calc-package sheet now carries the date of the check.',
      label: 'Open the checked work',
    },
  }
  const line = lines[input.notice]
  return render({
    subject: line.subject,
    paragraphs: [
      `Hello ${input.recipientName},`,
      line.says,
      ...(input.comment ? [`The comment: “${input.comment}”`] : []),
      line.next,
    ],
    action: { label: line.label, url: input.url },
    footer: `${PRODUCT}: response spectra for structural and earthquake engineers. Sent to members of ${input.firmName} taking part in checking this work.`,
  })
}

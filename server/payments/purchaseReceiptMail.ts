import { formatMoney } from '../../shared/credits/creditPacks.js'
import { escapeHtml } from '../mail/templates.js'
import type { OutgoingMail } from '../services/mail.js'

export interface PurchaseReceipt {
  to: string
  adminName: string
  firmName: string
  packName: string
  credits: number
  amountCents: number
  currency: string
  balance: number
  chargeId: string
  purchasedAt: number
  testMode: boolean
}

/** The receipt e-mailed to the admin who bought a pack: pack, amount, new balance and charge id. Plain, no tracking. */
export function purchaseReceiptMail(r: PurchaseReceipt): OutgoingMail {
  const amount = formatMoney(r.amountCents, r.currency)
  const when = `${new Date(r.purchasedAt).toISOString().slice(0, 16).replace('T', ' ')} UTC`
  const subject = `${r.testMode ? '[TEST] ' : ''}Ordinate receipt: ${r.credits} run credits for ${r.firmName}`
  const rows: [string, string][] = [
    ['Pack', `${r.packName} (${r.credits} run credits)`],
    ['Amount', amount],
    ['New balance', `${r.balance} run credits`],
    ['Charge id', r.chargeId],
    ['Date', when],
  ]
  const intro = `Hello ${r.adminName}, your purchase of run credits for ${r.firmName} went through.`
  const testNote = 'This was a test-mode purchase: no real card was charged.'
  const footer =
    'Ordinate: response spectra for structural and earthquake engineers. Sent to the admin who made this purchase.'
  const text = [
    intro,
    rows.map(([k, v]) => `${k}: ${v}`).join('\n'),
    ...(r.testMode ? [testNote] : []),
    `-- \n${footer}`,
  ].join('\n\n')
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="font-family:sans-serif;font-size:15px;line-height:1.5;color:#1d2a33;max-width:560px;margin:24px auto;padding:0 16px">
<p style="margin:0 0 24px;font-weight:600;letter-spacing:0.04em">Ordinate</p>
<p style="margin:0 0 16px">${escapeHtml(intro)}</p>
<table style="border-collapse:collapse;margin:0 0 16px">
${rows.map(([k, v]) => `<tr><th style="text-align:left;padding:2px 16px 2px 0;font-weight:600">${escapeHtml(k)}</th><td style="padding:2px 0">${escapeHtml(v)}</td></tr>`).join('\n')}
</table>
${r.testMode ? `<p style="margin:0 0 16px">${escapeHtml(testNote)}</p>` : ''}
<hr style="border:none;border-top:1px solid #d5dde3;margin:24px 0">
<p style="margin:0;font-size:13px;color:#52606b">${escapeHtml(footer)}</p>
</body></html>
`
  return { to: r.to, subject, text, html }
}

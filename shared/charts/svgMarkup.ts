/** Small helpers for writing SVG as text, deterministically and safely. */

const XML_ESCAPES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
}

/** Escapes text for use in SVG element content and in double-quoted attributes. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => XML_ESCAPES[c] ?? c)
}

/**
 * A coordinate with at most two decimals and no exponent, so the same data
 * always gives the same bytes (and -0 prints as 0).
 */
export function px(value: number): string {
  const rounded = Math.round(value * 100) / 100
  return rounded === 0 ? '0' : String(rounded)
}

/** Keeps ids to characters that are safe in `url(#…)` references. */
export function safeId(id: string): string {
  const cleaned = id.replace(/[^A-Za-z0-9_-]/g, '-')
  return /^[A-Za-z]/.test(cleaned) ? cleaned : `c-${cleaned}`
}

export const FONT_FAMILY = "'Source Sans 3', 'Source Sans Pro', Arial, sans-serif"

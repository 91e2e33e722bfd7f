/**
 * Legend layout for the charts: entries in one or two columns, each wrapped onto as many
 * lines as its text needs, so a legend never cuts a value off ("SDS = 1.0 g", "ζ = 5%").
 * The charts never measure text (the server draws the same SVG as the browser), so widths
 * are estimated from per-character advance widths that run a little wider than the chart
 * font (Source Sans 3): an estimate that errs wide wraps early rather than overflowing.
 */

/** Advance widths in em, by kind of character; values from memory of Source Sans 3, rounded up. */
const NARROW = new Set([...'iljtfrI.,:;!|\'"`()[]{}/ '])
const WIDE = new Set([...'mwMW@%—'])

/** Estimated width of `text` in px at `fontSizePx`. */
export function estimateTextWidthPx(text: string, fontSizePx: number): number {
  let em = 0
  for (const ch of text) {
    if (NARROW.has(ch)) em += 0.3
    else if (WIDE.has(ch)) em += 0.85
    else if (ch >= 'A' && ch <= 'Z') em += 0.62
    else em += 0.54
  }
  return em * fontSizePx
}

/**
 * Breaks `text` into lines no wider than `widthPx`, at spaces where it can and inside a
 * word only when the word alone is too wide. No character is dropped.
 */
export function wrapText(text: string, widthPx: number, fontSizePx: number): string[] {
  if (!(widthPx > 0)) throw new RangeError('widthPx must be positive')
  const fits = (s: string) => estimateTextWidthPx(s, fontSizePx) <= widthPx
  const lines: string[] = []
  let line = ''
  for (const word of text.split(/ +/)) {
    const joined = line ? `${line} ${word}` : word
    if (fits(joined)) {
      line = joined
      continue
    }
    if (line) lines.push(line)
    line = ''
    let rest = word
    while (rest.length > 1 && !fits(rest)) {
      let n = rest.length - 1
      while (n > 1 && !fits(rest.slice(0, n))) n--
      lines.push(rest.slice(0, n))
      rest = rest.slice(n)
    }
    line = rest
  }
  if (line || lines.length === 0) lines.push(line)
  return lines
}

export interface LegendPlacement {
  /** Column of the entry, 0 or 1. */
  column: number
  /** Line of the legend the entry's first line sits on, from 0. */
  line: number
  lines: string[]
}

export interface LegendLayout {
  columns: number
  /** How many lines the legend takes. */
  lineCount: number
  entries: LegendPlacement[]
}

/**
 * Places legend texts in a box `widthPx` wide. Two columns when there is more than one entry
 * and each fits its half on one line; otherwise one column, each entry wrapped to its lines.
 * `indentPx` is the room each entry's swatch takes before its text.
 */
export function layoutLegend(
  texts: string[],
  options: { widthPx: number; fontSizePx: number; indentPx: number; minTwoColumnWidthPx?: number },
): LegendLayout {
  const { widthPx, fontSizePx, indentPx } = options
  const halfText = widthPx / 2 - indentPx - 10
  const twoColumns =
    texts.length > 1 &&
    widthPx >= (options.minTwoColumnWidthPx ?? 0) &&
    texts.every((t) => estimateTextWidthPx(t, fontSizePx) <= halfText)
  if (twoColumns) {
    return {
      columns: 2,
      lineCount: Math.ceil(texts.length / 2),
      entries: texts.map((t, i) => ({ column: i % 2, line: Math.floor(i / 2), lines: [t] })),
    }
  }
  const textWidth = Math.max(fontSizePx * 4, widthPx - indentPx)
  let line = 0
  const entries = texts.map((t) => {
    const lines = wrapText(t, textWidth, fontSizePx)
    const placed = { column: 0, line, lines }
    line += lines.length
    return placed
  })
  return { columns: 1, lineCount: line, entries }
}

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
  /** Column of the entry: 0 (the left half, or the whole width for a wrapped entry) or 1. */
  column: number
  /** Line of the legend the entry's first line sits on, from 0. */
  line: number
  lines: string[]
}

export interface LegendLayout {
  /** 2 when any entry sits in the right half. */
  columns: number
  /** How many lines the legend takes. */
  lineCount: number
  entries: LegendPlacement[]
}

/**
 * Places legend texts in a box `widthPx` wide, in order. Where the box is wide enough
 * (`minTwoColumnWidthPx`), entries that fit half the width go two to a line; an entry too long
 * for its half takes the whole width on a line of its own, wrapped onto as many lines as it
 * needs. `indentPx` is the room each entry's swatch takes before its text.
 */
export function layoutLegend(
  texts: string[],
  options: { widthPx: number; fontSizePx: number; indentPx: number; minTwoColumnWidthPx?: number },
): LegendLayout {
  const { widthPx, fontSizePx, indentPx } = options
  const halves = texts.length > 1 && widthPx >= (options.minTwoColumnWidthPx ?? 0)
  const halfText = widthPx / 2 - indentPx - 10
  const fullText = Math.max(fontSizePx * 4, widthPx - indentPx)
  let line = 0
  let column = 0
  const entries = texts.map((text): LegendPlacement => {
    if (halves && estimateTextWidthPx(text, fontSizePx) <= halfText) {
      const placed = { column, line, lines: [text] }
      if (column === 1) line++
      column = 1 - column
      return placed
    }
    if (column === 1) line++
    column = 0
    const placed = { column: 0, line, lines: wrapText(text, fullText, fontSizePx) }
    line += placed.lines.length
    return placed
  })
  return {
    columns: entries.some((e) => e.column === 1) ? 2 : 1,
    lineCount: line + column,
    entries,
  }
}

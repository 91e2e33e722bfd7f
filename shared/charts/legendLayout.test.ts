import { describe, expect, it } from 'vitest'
import { estimateTextWidthPx, layoutLegend, wrapText } from './legendLayout.js'

const TARGET = 'ASCE 7-16 two-period design spectrum, SDS = 1.000 g, SD1 = 0.600 g, TL = 8 s'

describe('wrapText', () => {
  it('keeps every word and puts each line within the width', () => {
    const lines = wrapText(TARGET, 160, 12)
    expect(lines.length).toBeGreaterThan(1)
    expect(lines.join(' ')).toBe(TARGET)
    for (const line of lines) expect(estimateTextWidthPx(line, 12)).toBeLessThanOrEqual(160)
  })

  it('breaks a word wider than the line without dropping a character', () => {
    const word = 'Station-with-a-very-long-hyphenated-name-HNE'
    const lines = wrapText(word, 60, 12)
    expect(lines.join('')).toBe(word)
    for (const line of lines) expect(estimateTextWidthPx(line, 12)).toBeLessThanOrEqual(60)
  })

  it('leaves a short text on one line', () => {
    expect(wrapText('Target', 200, 12)).toEqual(['Target'])
  })
})

describe('layoutLegend', () => {
  const box = { widthPx: 628, fontSizePx: 12, indentPx: 30, minTwoColumnWidthPx: 560 }

  it('uses two columns when every entry fits its half', () => {
    const layout = layoutLegend(['Record A, ζ = 5%', 'Record B, ζ = 5%', 'Mean'], box)
    expect(layout.columns).toBe(2)
    expect(layout.lineCount).toBe(2)
    expect(layout.entries.map((e) => [e.column, e.line])).toEqual([
      [0, 0],
      [1, 0],
      [0, 1],
    ])
  })

  it('falls back to one column, wrapping, when an entry would not fit its half', () => {
    const layout = layoutLegend(['Record A, ζ = 5%', TARGET, 'Mean'], { ...box, widthPx: 400 })
    expect(layout.columns).toBe(1)
    const target = layout.entries[1]
    expect(target?.lines.join(' ')).toBe(TARGET)
    expect(target?.lines.at(-1)).toContain('8 s')
    expect(layout.lineCount).toBe(layout.entries.reduce((n, e) => n + e.lines.length, 0))
    expect(layout.entries[2]?.line).toBe(1 + (target?.lines.length ?? 0))
  })

  it('gives an entry too long for its half a line of its own, keeping the others two to a line', () => {
    const layout = layoutLegend(
      ['Record A, ζ = 5%', 'Record B, ζ = 5%', TARGET, 'Mean', '90% of target'],
      box,
    )
    expect(layout.columns).toBe(2)
    expect(layout.entries.map((e) => [e.column, e.line])).toEqual([
      [0, 0],
      [1, 0],
      [0, 1],
      [0, 2],
      [1, 2],
    ])
    expect(layout.entries[2]?.lines).toEqual([TARGET])
    expect(layout.lineCount).toBe(3)
  })

  it('keeps one column below the two-column width', () => {
    expect(layoutLegend(['a', 'b'], { ...box, widthPx: 500 }).columns).toBe(1)
  })
})

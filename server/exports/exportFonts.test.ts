import { readFileSync } from 'node:fs'
import { Font } from 'fonteditor-core'
import { describe, expect, it } from 'vitest'
import { exportFontFiles, mergedFontTtf, printableDeep, printableText } from './exportFonts.js'

describe('exportFontFiles', () => {
  it('merges the subsets: Greek for ζ β γ Δ, and accented Latin for station names', () => {
    for (const file of Object.values(exportFontFiles())) {
      const font = Font.create(readFileSync(file), { type: 'ttf' }).get()
      expect(font.name.fontFamily).toBe('Source Sans 3')
      const codePoints = new Set(Object.keys(font.cmap).map(Number))
      for (const char of 'AZaz09ζβγΔωσ²·×–—±ŁłōİıčüéŽ') {
        expect(codePoints.has(char.codePointAt(0) as number), `glyph for ${char}`).toBe(true)
      }
    }
  })
})

describe('mergedFontTtf', () => {
  it('builds the same bytes every time, so a sheet exported after a rebuild embeds the same font', () => {
    expect(mergedFontTtf('regular').equals(mergedFontTtf('regular'))).toBe(true)
  })
})

describe('printableText', () => {
  it('leaves drawable text alone', () => {
    expect(printableText('Kocaeli, Düzce; ζ = 5%, Δt = 0.005 s')).toBe('Kocaeli, Düzce; ζ = 5%, Δt = 0.005 s')
  })

  it('spells out operators the font lacks and marks anything else it cannot draw', () => {
    expect(printableText('h/T ≤ √3/π, mean ≥ 0.9')).toBe('h/T <= sqrt3/π, mean >= 0.9')
    expect(printableText('台北')).toBe('??')
  })

  it('maps every string of a nested value, keeping numbers', () => {
    expect(printableDeep({ a: ['x ≥ y', 2], b: { c: 'ok' } })).toEqual({ a: ['x >= y', 2], b: { c: 'ok' } })
  })
})

import { execFileSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { formatSignificant } from '../../shared/charts/units.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import { demoRunFacts, demoRunSheet } from '../../tests/support/sheetFixtures.js'
import { renderSheetPdf } from './sheetPdf.js'

let scratch: string
beforeAll(() => {
  scratch = mkdtempSync(path.join(tmpdir(), 'ordinate-sheet-'))
})
afterAll(() => rmSync(scratch, { recursive: true, force: true }))

/** The PDF's text as poppler's pdftotext reads it. */
function pdfText(pdf: Buffer, name: string): string {
  const file = path.join(scratch, `${name}.pdf`)
  writeFileSync(file, pdf)
  return execFileSync('pdftotext', ['-layout', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' })
}

const checked = {
  state: 'checked' as const,
  submittedAt: Date.UTC(2026, 0, 13),
  decidedByName: 'Tomas Verhoek',
  decidedAt: Date.UTC(2026, 0, 14, 15, 30),
}

describe('renderSheetPdf, from an engine computation on the synthetic demo record', () => {
  it('prints the hash, the method statement, the cautions and PSA at 1 s', async () => {
    const facts = demoRunFacts()
    const text = pdfText(await renderSheetPdf(demoRunSheet()), 'demo')
    expect(text).toContain(facts.records[0]?.sha256)
    expect(text).toContain('Newmark-β, average acceleration (γ = 1/2, β = 1/4)')
    expect(text).toContain('8001')
    expect(text).toContain('0.005 s')
    expect(text).toContain('ζ = 2%, ζ = 5%')
    expect(text).toContain(
      'Ordinate is a calculation aid; the licensed engineer of record is responsible for its use;',
    )
    const at1s = Array.from(facts.spectrum.periodsS).indexOf(1)
    const expected = facts.spectrum.curves.map((c) =>
      formatSignificant((c.psaMPerS2[at1s] as number) / STANDARD_GRAVITY_M_PER_S2),
    )
    const row = /^\s*1\s+(\S+)\s+(\S+)\s*$/m.exec(text.slice(text.indexOf('at standard periods')))
    expect(row?.slice(1)).toEqual(expected)
  })

  it('gives the same bytes for the same sheet', async () => {
    const sheet = demoRunSheet({ review: checked })
    const first = await renderSheetPdf(sheet)
    const second = await renderSheetPdf(structuredClone(sheet))
    expect(second.equals(first)).toBe(true)
  })

  it('dates the document by the sheet (the check), not by the clock', async () => {
    const pdf = await renderSheetPdf(demoRunSheet({ review: checked }))
    const text = pdfText(pdf, 'checked')
    const info = execFileSync('pdfinfo', ['-isodates', path.join(scratch, 'checked.pdf')], {
      encoding: 'utf8',
    })
    expect(info).toMatch(/CreationDate:\s+2026-01-14T15:30:00Z/)
    expect(info).toMatch(/ModDate:\s+2026-01-14T15:30:00Z/)
    expect(text).toContain('Date of check: 2026-01-14')
    expect(text).toMatch(/Checked by\s+Tomas Verhoek, 2026-01-14/)
  })

  it('prints markup in a record name as text', async () => {
    const name = '<img src=x onerror=alert(1)> & <b>bold</b>'
    const text = pdfText(await renderSheetPdf(demoRunSheet({ name })), 'markup')
    expect(text).toContain(`Elastic response spectrum: ${name}`)
  })

  it('spells out symbols the font cannot draw instead of printing blank boxes', async () => {
    const sheet = demoRunSheet()
    sheet.warnings.push('Δt/T ≥ 0.5 at the shortest periods; T ≤ 2Δt is not resolved')
    const text = pdfText(await renderSheetPdf(sheet), 'symbols')
    expect(text).toContain('Δt/T >= 0.5 at the shortest periods; T <= 2Δt is not resolved')
  })
})

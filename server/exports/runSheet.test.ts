import { describe, expect, it } from 'vitest'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import { defaultPeriodsS, logPeriodGrid } from '../../shared/spectra/periods.js'
import { periodGridStatement, runOrdinateTable } from './runSheet.js'
import { reviewAndDate, sheetReference } from './sheetParts.js'

const g = STANDARD_GRAVITY_M_PER_S2
/** A spectrum that is a power law in T, PSA = 0.5 g·T^-1 (exact under log-log interpolation). */
function powerLawSpectrum(periodsS: number[]) {
  const psa = periodsS.map((t) => 0.5 * g * t ** -1)
  const zero = periodsS.map(() => 0)
  return {
    periodsS,
    curves: [{ dampingRatio: 0.05, sdM: zero, svMPerS: zero, saMPerS2: psa, psvMPerS: zero, psaMPerS2: psa }],
  }
}

describe('runOrdinateTable', () => {
  const grid = logPeriodGrid(0.04, 6, 40)
  const table = runOrdinateTable(powerLawSpectrum(grid), 0.3 * g)
  const row = (label: string) => table.rows.find((r) => r.label === label)

  it('starts with T = 0 as the record’s PGA in g', () => {
    expect(table.rows[0]).toEqual({ label: '0 (PGA)', cells: ['0.3000'] })
  })

  it('reads off-grid standard periods log-log and marks them', () => {
    // 0.5 g / 0.75 s = 0.6667 g, exact for a power law (closed form).
    expect(row('0.75 *')?.cells).toEqual(['0.6667'])
    expect(table.notes.join(' ')).toContain('interpolated log-log')
  })

  it('gives the peak and its period from the grid', () => {
    // PSA falls with T, so the peak is at the first grid period, 0.04 s: 12.5 g.
    expect(row('Peak PSA')?.cells).toEqual(['12.50'])
    expect(row('Period of peak (s)')?.cells).toEqual(['0.0400'])
  })

  it('does not extrapolate past the run’s periods', () => {
    const short = runOrdinateTable(powerLawSpectrum(logPeriodGrid(0.1, 2, 20)), 0.3 * g)
    expect(short.rows.find((r) => r.label === '5')?.cells).toEqual(['—'])
    expect(short.rows.find((r) => r.label === '0.05')?.cells).toEqual(['—'])
    expect(short.notes.join(' ')).toContain('not extrapolated')
  })

  it('reads on-grid periods without marking them (1 s is on the default grid)', () => {
    const onDefault = runOrdinateTable(powerLawSpectrum(defaultPeriodsS()), 0.3 * g)
    expect(onDefault.rows.find((r) => r.label === '1')?.cells).toEqual(['0.5000'])
    expect(onDefault.rows.find((r) => r.label === '0.1')?.cells).toEqual(['5.000'])
    expect(onDefault.rows.some((r) => r.label === '0.2 *')).toBe(true)
  })
})

describe('periodGridStatement', () => {
  const base = { method: 'newmark-average' as const, dampingRatios: [0.05], periodGrid: null }

  it('states the default grid with its density', () => {
    expect(periodGridStatement({ ...base, periodsS: defaultPeriodsS(), periodChoice: 'default' })).toBe(
      '301 log-spaced periods from 0.01 s to 10 s (100 per decade), the default grid',
    )
  })

  it('states a listed set of periods by count and range, in any order', () => {
    expect(periodGridStatement({ ...base, periodsS: [2, 0.2, 1], periodChoice: 'list' })).toBe(
      '3 periods as listed, from 0.2 s to 2 s',
    )
  })
})

describe('reviewAndDate', () => {
  const work = {
    preparedByName: 'Ines Marlowe',
    doneAt: Date.UTC(2026, 2, 1, 23, 59),
    doneVerb: 'computed' as const,
  }

  it('dates unchecked work by when it was done and says it is not checked', () => {
    const { dateText, dateLabel, review } = reviewAndDate(work, null)
    expect(dateText).toBe('2026-03-01')
    expect(dateLabel).toBe('Date computed (not checked)')
    expect(review).toMatchObject({ state: 'draft', checkedBy: null, submittedOn: null })
  })

  it('dates checked work by the check and names the checker', () => {
    const decidedAt = Date.UTC(2026, 2, 9, 8)
    const result = reviewAndDate(work, {
      state: 'checked',
      submittedAt: Date.UTC(2026, 2, 2),
      decidedByName: 'Tomas Verhoek',
      decidedAt,
    })
    expect(result.dateMs).toBe(decidedAt)
    expect(result.dateLabel).toBe('Date of check')
    expect(result.review).toMatchObject({
      state: 'checked',
      checkedBy: 'Tomas Verhoek',
      checkedOn: '2026-03-09',
      submittedOn: '2026-03-02',
    })
  })

  it('does not name the checker of returned work as having checked it', () => {
    const result = reviewAndDate(work, {
      state: 'returned',
      submittedAt: Date.UTC(2026, 2, 2),
      decidedByName: 'Tomas Verhoek',
      decidedAt: Date.UTC(2026, 2, 3),
    })
    expect(result.review.checkedBy).toBeNull()
    expect(result.dateMs).toBe(work.doneAt)
    expect(result.review.stateLabel).toBe('Returned with comments')
  })
})

describe('sheetReference', () => {
  it('is the kind and the first eight hex digits of the id', () => {
    expect(sheetReference('run', '3f2a9c1b-1234-4000-8000-000000000000')).toBe('ORD-R-3F2A9C1B')
    expect(sheetReference('comparison', '0badcafe-1234-4000-8000-000000000000')).toBe('ORD-C-0BADCAFE')
  })
})

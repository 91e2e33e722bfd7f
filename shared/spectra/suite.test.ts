import { describe, expect, it } from 'vitest'
import {
  suiteCautions,
  commonPeriodGrid,
  interpolateLogLog,
  logLeastSquaresScaleFactor,
  scaleSuite,
  suiteStatistics,
} from './suite.js'

// Worked values are computed by hand in the comments; the formulas are the definitions of the
// arithmetic and geometric mean and sample standard deviation, and the normal equation of a
// one-parameter least-squares fit in ln y (closed form).

describe('interpolateLogLog', () => {
  it('is exact on a power law', () => {
    // y = x² through (1, 1) and (10, 100): at x = 2, w = ln2/ln10 = 0.30103,
    // ln y = 0 + w·ln100 = 1.386294 → y = 4 = 2².
    const y = interpolateLogLog([1, 10], [1, 100], [1, 2, Math.sqrt(10), 10])
    expect(y[0]).toBeCloseTo(1, 12)
    expect(y[1]).toBeCloseTo(4, 12)
    expect(y[2]).toBeCloseTo(10, 12)
    expect(y[3]).toBeCloseTo(100, 12)
  })

  it('never extrapolates', () => {
    const y = interpolateLogLog([1, 10], [1, 100], [0.5, 11])
    expect(Number.isNaN(y[0])).toBe(true)
    expect(Number.isNaN(y[1])).toBe(true)
  })

  it('handles unsorted query points and several segments', () => {
    // Segments (1,1)–(2,2)–(4,16): at 3, w = ln1.5/ln2 = 0.584963, y = 2·8^0.584963 = 6.7456.
    const y = interpolateLogLog([1, 2, 4], [1, 2, 16], [3, 1.5])
    expect(y[0]).toBeCloseTo(2 * 8 ** (Math.log(1.5) / Math.log(2)), 12)
    expect(y[1]).toBeCloseTo(1.5, 12)
  })

  it('refuses non-increasing or non-positive abscissae', () => {
    expect(() => interpolateLogLog([1, 1], [1, 2], [1])).toThrow(RangeError)
    expect(() => interpolateLogLog([0, 1], [1, 2], [1])).toThrow(RangeError)
  })
})

describe('commonPeriodGrid', () => {
  it('keeps a grid every curve shares', () => {
    const g = [0.1, 0.2, 0.5]
    expect(Array.from(commonPeriodGrid([g, [...g]]))).toEqual(g)
  })

  it('spans the overlap with 100 points per decade otherwise', () => {
    // Overlap of [0.01, 10] and [0.1, 5] is [0.1, 5]: round(100·log10(50)) + 1 = round(169.9) + 1 = 171.
    const g = commonPeriodGrid([
      [0.01, 1, 10],
      [0.1, 5],
    ])
    expect(g.length).toBe(171)
    expect(g[0]).toBe(0.1)
    expect(g[170]).toBe(5)
  })

  it('refuses grids with nothing in common', () => {
    expect(() =>
      commonPeriodGrid([
        [0.1, 0.2],
        [0.5, 1],
      ]),
    ).toThrow(/in common/)
  })
})

describe('suiteStatistics', () => {
  // One period, three records with PSA 1, 2 and 4.
  const curves = [[1], [2], [4]]

  it('arithmetic: mean 7/3 and sample σ 1.527525', () => {
    // mean = 7/3 = 2.333333; deviations −4/3, −1/3, 5/3; Σd² = 16/9 + 1/9 + 25/9 = 42/9;
    // σ = √((42/9)/2) = √(7/3) = 1.527525.
    const s = suiteStatistics(curves, 'arithmetic')
    expect(s.mean[0]).toBeCloseTo(7 / 3, 12)
    expect(s.sigma?.[0]).toBeCloseTo(Math.sqrt(7 / 3), 12)
    expect(s.lower?.[0]).toBeCloseTo(7 / 3 - Math.sqrt(7 / 3), 12)
    expect(s.upper?.[0]).toBeCloseTo(7 / 3 + Math.sqrt(7 / 3), 12)
  })

  it('geometric: mean 2 and σ of ln PSA = ln 2, so the band is 1 to 4', () => {
    // ln y = 0, ln2, 2ln2 → μ = ln2, mean e^μ = 2; deviations −ln2, 0, ln2;
    // σ = √(2·ln²2/2) = ln2; band e^(ln2 ± ln2) = 1 and 4.
    const s = suiteStatistics(curves, 'geometric')
    expect(s.mean[0]).toBeCloseTo(2, 12)
    expect(s.sigma?.[0]).toBeCloseTo(Math.LN2, 12)
    expect(s.lower?.[0]).toBeCloseTo(1, 12)
    expect(s.upper?.[0]).toBeCloseTo(4, 12)
    expect(s.label).toMatch(/ln PSA/)
  })

  it('has no band with one curve', () => {
    const s = suiteStatistics([[3]], 'arithmetic')
    expect(s.mean[0]).toBe(3)
    expect(s.lower).toBeNull()
  })
})

describe('logLeastSquaresScaleFactor', () => {
  it('is the geometric mean of target/record over the range', () => {
    // Ratios 1/0.5 = 2 and 4/0.5 = 8: ln f = (ln2 + ln8)/2 = 2ln2 → f = 4.
    expect(logLeastSquaresScaleFactor([0.5, 1], [0.5, 0.5], [1, 4], 0.5, 1)).toBeCloseTo(4, 12)
  })

  it('minimises the squared log misfit', () => {
    const periods = [0.2, 0.5, 1, 2]
    const rec = [0.9, 1.3, 0.6, 0.2]
    const tgt = [1.0, 1.0, 0.7, 0.35]
    const f = logLeastSquaresScaleFactor(periods, rec, tgt, 0.2, 2)
    const misfit = (k: number) => rec.reduce((s, y, i) => s + Math.log((k * y) / (tgt[i] as number)) ** 2, 0)
    expect(misfit(f)).toBeLessThan(misfit(f * 1.001))
    expect(misfit(f)).toBeLessThan(misfit(f / 1.001))
  })

  it('ignores periods outside the range', () => {
    // Only T = 0.5 lies in [0.4, 0.6]: f = 1/0.5 = 2.
    expect(logLeastSquaresScaleFactor([0.2, 0.5, 1], [9, 0.5, 9], [1, 1, 1], 0.4, 0.6)).toBeCloseTo(2, 12)
  })

  it('refuses a target undefined inside the range', () => {
    expect(() => logLeastSquaresScaleFactor([0.5, 5], [1, 1], [1, NaN], 0.5, 5)).toThrow(/not defined/)
  })
})

describe('scaleSuite', () => {
  // Periods 0.5, 1, 2 s; records A = [1, 1, 1], B = [1, 3, 1]; target [1, 2, 4]; range [0.5, 2].
  const periods = [0.5, 1, 2]
  const curves = [
    [1, 1, 1],
    [1, 3, 1],
  ]
  const target = [1, 2, 4]

  it('suite-90: one factor, the largest 0.9·target/mean, and the check passes at the governing period', () => {
    // Arithmetic mean [1, 2, 1]; 0.9·target/mean = [0.9, 0.9, 3.6] → F = 3.6.
    // Scaled mean [3.6, 7.2, 3.6]; mean/target = [3.6, 3.6, 0.9] → minimum 0.9 at T = 2 s: pass.
    const s = scaleSuite(periods, curves, target, {
      fromS: 0.5,
      toS: 2,
      rule: 'suite-90',
      meanKind: 'arithmetic',
    })
    expect(s.factors).toEqual([3.6, 3.6].map((v) => expect.closeTo(v, 12)))
    expect(s.check.minRatio).toBeCloseTo(0.9, 12)
    expect(s.check.governingPeriodS).toBe(2)
    expect(s.check.passed).toBe(true)
  })

  it('lsq-log: per-record factors, and the check fails when the scaled mean dips below 90%', () => {
    // A: ln f = (0 + ln2 + ln4)/3 = ln2 → f = 2.
    // B: f = (1·(2/3)·4)^(1/3) = (8/3)^(1/3) = 1.386722.
    // Scaled A = [2, 2, 2], B = [1.386722, 4.160167, 1.386722]; mean at 2 s = 1.693361;
    // 1.693361/4 = 0.423340 < 0.9 → fail, governed at T = 2 s.
    const s = scaleSuite(periods, curves, target, {
      fromS: 0.5,
      toS: 2,
      rule: 'lsq-log',
      meanKind: 'arithmetic',
    })
    expect(s.factors[0]).toBeCloseTo(2, 12)
    expect(s.factors[1]).toBeCloseTo((8 / 3) ** (1 / 3), 12)
    expect(s.check.minRatio).toBeCloseTo(0.42334, 5)
    expect(s.check.governingPeriodS).toBe(2)
    expect(s.check.passed).toBe(false)
    expect(s.ruleLabel).toMatch(/least squares/)
  })

  it('suite-90 with the geometric mean scales the geometric mean', () => {
    // Geometric mean [1, √3, 1]; 0.9·target/mean = [0.9, 1.039230, 3.6] → F = 3.6.
    const s = scaleSuite(periods, curves, target, {
      fromS: 0.5,
      toS: 2,
      rule: 'suite-90',
      meanKind: 'geometric',
    })
    expect(s.factors[0]).toBeCloseTo(3.6, 12)
    expect(s.scaledMean[1]).toBeCloseTo(3.6 * Math.sqrt(3), 12)
    expect(s.check.passed).toBe(true)
  })
})

describe('suiteCautions', () => {
  const a = { id: 'a', name: 'Record A' }
  const b = { id: 'b', name: 'Record B' }
  const c = { id: 'c', name: 'Record C' }
  it('names a record counted alone and inside a pair, and the places it is counted', () => {
    const cautions = suiteCautions(
      [
        { label: 'Pair AB', records: [a, b], pair: true },
        { label: 'Record A', records: [a], pair: false },
        { label: 'Record C', records: [c], pair: false },
      ],
      null,
    )
    expect(cautions).toEqual([
      'The record “Record A” is counted 2 times in this suite (inside the pair “Pair AB”; alone as “Record A”), which weights it in the mean more than the others.',
    ])
  })
  it('compares the suite size with the code of the target (EN 1998-1: 3, ASCE 7: 11; from memory)', () => {
    const two = [
      { label: 'A', records: [a], pair: false },
      { label: 'B', records: [b], pair: false },
    ]
    expect(suiteCautions(two, 'en1998-1')).toEqual([
      'The suite has 2 of the 3 ground motions that EN 1998-1 usually asks for in response-history analysis (from memory; the locally adopted code governs).',
    ])
    expect(suiteCautions([...two, { label: 'C', records: [c], pair: false }], 'en1998-1')).toEqual([])
    expect(suiteCautions(two, 'asce7-two-period')[0]).toMatch(/2 of the 11 ground motions/)
    expect(suiteCautions(two, 'user')).toEqual([])
  })
})

import { describe, expect, it } from 'vitest'
import {
  EN1998_GROUND_PARAMETERS,
  asce7TwoPeriodSaG,
  en1998ElasticSaG,
  en1998Eta,
  evaluateTarget,
} from './targets.js'

// Worked values below are computed by hand from the formulas quoted in each test, which follow
// ASCE 7-16 §11.4.6 and EN 1998-1 §3.2.2.2 (formulas and tables as listed in targets.ts).

describe('asce7TwoPeriodSaG (ASCE 7-16 §11.4.6)', () => {
  // SDS = 1.0 g, SD1 = 0.6 g, TL = 8 s.
  // T0 = 0.2·SD1/SDS = 0.2·0.6/1.0 = 0.12 s; TS = SD1/SDS = 0.6 s.
  const params = { sdsG: 1.0, sd1G: 0.6, tlS: 8 }

  it('follows each branch at hand-computed periods', () => {
    const periods = [0, 0.06, 0.12, 0.3, 0.6, 1, 2, 8, 10]
    const expected = [
      0.4, // T = 0: SDS·(0.4 + 0) = 0.4
      0.7, // T = 0.06 < T0: 1.0·(0.4 + 0.6·0.06/0.12) = 0.4 + 0.3 = 0.7
      1.0, // T = T0: the plateau SDS
      1.0, // T0 ≤ 0.3 ≤ TS: SDS
      1.0, // T = TS: SD1/TS = 0.6/0.6 = 1.0 (continuous)
      0.6, // TS < 1 ≤ TL: SD1/T = 0.6/1
      0.3, // 0.6/2
      0.075, // T = TL: 0.6/8
      0.048, // T > TL: SD1·TL/T² = 0.6·8/100
    ]
    const sa = asce7TwoPeriodSaG(periods, params)
    expected.forEach((v, i) => expect(sa[i]).toBeCloseTo(v, 12))
  })

  it('gives MCE_R as 1.5 × design', () => {
    // At T = 1 s: 1.5·0.6 = 0.9 g; at T = 0: 1.5·0.4 = 0.6 g.
    const sa = asce7TwoPeriodSaG([0, 1], { ...params, level: 'mceR' })
    expect(sa[0]).toBeCloseTo(0.6, 12)
    expect(sa[1]).toBeCloseTo(0.9, 12)
  })

  it('is continuous at T0, TS and TL', () => {
    const eps = 1e-9
    for (const t of [0.12, 0.6, 8]) {
      const [below, above] = asce7TwoPeriodSaG([t - eps, t + eps], params)
      expect(Math.abs((below as number) - (above as number))).toBeLessThan(1e-7)
    }
  })

  it('refuses non-positive parameters and TL below TS', () => {
    expect(() => asce7TwoPeriodSaG([1], { ...params, sdsG: 0 })).toThrow(RangeError)
    expect(() => asce7TwoPeriodSaG([1], { ...params, tlS: 0.5 })).toThrow(/TS/)
    expect(() => asce7TwoPeriodSaG([-1], params)).toThrow(RangeError)
  })

  it('labels the edition in the evaluated target', () => {
    const t = evaluateTarget({ kind: 'asce7-two-period', ...params }, [1])
    expect(t.label).toContain('ASCE 7-16')
    expect(t.notes.join(' ')).toContain('ASCE 7-22')
  })
})

describe('en1998Eta (EN 1998-1 §3.2.2.2(3): η = √(10/(5 + ξ)) ≥ 0.55, ξ in percent)', () => {
  it('is 1 at 5% damping', () => expect(en1998Eta(0.05)).toBe(1))
  it('takes the ratio and converts to percent', () => {
    // ξ = 10%: √(10/15) = 0.816497; ξ = 2%: √(10/7) = 1.195229; ξ = 28%: √(10/33) = 0.550482.
    expect(en1998Eta(0.1)).toBeCloseTo(0.816497, 6)
    expect(en1998Eta(0.02)).toBeCloseTo(1.195229, 6)
    expect(en1998Eta(0.28)).toBeCloseTo(0.550482, 6)
  })
  it('is bounded below by 0.55', () => {
    // ξ = 30%: √(10/35) = 0.534522 < 0.55, so η = 0.55.
    expect(en1998Eta(0.3)).toBe(0.55)
  })
})

describe('en1998ElasticSaG (EN 1998-1 §3.2.2.2, recommended values)', () => {
  it('follows each branch for Type 1, ground B, ag = 0.25 g, 5%', () => {
    // Table 3.2, ground B: S = 1.2, TB = 0.15, TC = 0.5, TD = 2.0; η = 1.
    // Plateau 2.5·ag·S·η = 2.5·0.25·1.2 = 0.75 g.
    const periods = [0, 0.075, 0.15, 0.3, 0.5, 1, 2, 3, 4]
    const expected = [
      0.3, // T = 0: ag·S = 0.25·1.2
      0.525, // T = TB/2: 0.3·[1 + 0.5·(2.5 − 1)] = 0.3·1.75
      0.75, // T = TB: plateau
      0.75,
      0.75, // T = TC
      0.375, // 0.75·TC/T = 0.75·0.5/1
      0.1875, // T = TD: 0.75·0.5/2
      (0.75 * 0.5 * 2) / 9, // TD ≤ 3 ≤ 4: 0.75·TC·TD/T² = 0.75/9 = 0.083333
      0.046875, // T = 4: 0.75/16
    ]
    const { saG, beyondDefinedRange } = en1998ElasticSaG(periods, {
      spectrumType: 1,
      groundType: 'B',
      agG: 0.25,
      dampingRatio: 0.05,
    })
    expected.forEach((v, i) => expect(saG[i]).toBeCloseTo(v, 12))
    expect(beyondDefinedRange).toBe(false)
  })

  it('applies η for Type 2, ground D, ag = 0.1 g, 10%', () => {
    // Table 3.3, ground D: S = 1.8, TB = 0.1, TC = 0.3, TD = 1.2; η = √(10/15) = 0.816497.
    // Plateau 2.5·0.1·1.8·0.816497 = 0.367423 g.
    // T = 0.05: 0.1·1.8·[1 + 0.5·(2.5·0.816497 − 1)] = 0.18·1.520621 = 0.273712 g.
    // T = 0.6: 0.367423·0.3/0.6 = 0.183712 g.
    const { saG } = en1998ElasticSaG([0.05, 0.2, 0.6], {
      spectrumType: 2,
      groundType: 'D',
      agG: 0.1,
      dampingRatio: 0.1,
    })
    expect(saG[0]).toBeCloseTo(0.273712, 5)
    expect(saG[1]).toBeCloseTo(0.367423, 5)
    expect(saG[2]).toBeCloseTo(0.183712, 5)
  })

  it('is undefined beyond 4 s and flags it', () => {
    const params = { spectrumType: 1 as const, groundType: 'A' as const, agG: 0.2, dampingRatio: 0.05 }
    const { saG, beyondDefinedRange } = en1998ElasticSaG([1, 4, 5], params)
    expect(Number.isNaN(saG[2])).toBe(true)
    expect(Number.isFinite(saG[1])).toBe(true)
    expect(beyondDefinedRange).toBe(true)
    const evaluated = evaluateTarget({ kind: 'en1998-1', ...params }, [1, 5])
    expect(evaluated.notes.join(' ')).toMatch(/up to 4 s/)
  })

  it('has five ground types for both spectrum types, with TB < TC < TD', () => {
    for (const type of [1, 2] as const) {
      for (const g of ['A', 'B', 'C', 'D', 'E'] as const) {
        const p = EN1998_GROUND_PARAMETERS[type][g]
        expect(p.tbS).toBeLessThan(p.tcS)
        expect(p.tcS).toBeLessThan(p.tdS)
      }
    }
  })
})

describe('evaluateTarget with a user target', () => {
  it('interpolates log-log between points and is undefined outside them', () => {
    // Points (0.1 s, 0.5 g) and (1 s, 0.05 g): a power law Sa = 0.05·T^(−1).
    // At T = 0.5 s: 0.05/0.5 = 0.1 g.
    const t = evaluateTarget({ kind: 'user', periodsS: [0.1, 1], saG: [0.5, 0.05] }, [0.5, 2])
    expect(t.saG[0]).toBeCloseTo(0.1, 12)
    expect(Number.isNaN(t.saG[1])).toBe(true)
    expect(t.beyondDefinedRange).toBe(true)
  })
})

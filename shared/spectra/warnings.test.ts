import { describe, expect, it } from 'vitest'
import { warningMessage, warningMessages } from '../warningMessages.js'
import { SPECTRUM_WARNING_CODES, type SpectrumWarning, mergeSpectrumWarnings } from './warnings.js'

describe('spectrum warnings', () => {
  const capped: SpectrumWarning = {
    code: 'sub-step-cap',
    oscillators: 2,
    maxSubSteps: 1024,
    errorEstimate: 0.016,
  }
  const short: SpectrumWarning = { code: 'periods-below-two-dt', periods: 3, twoDtS: 0.02 }
  const bound: SpectrumWarning = {
    code: 'peak-bound-above-budget',
    oscillators: 1,
    maxSubSteps: 1024,
    budget: 0.0025,
  }
  const damping: SpectrumWarning = {
    code: 'damping-above-accuracy-limit',
    accuracyTarget: 0.005,
    dampingLimit: 0.3,
  }

  it('every code has its own wording, with the values in it', () => {
    const texts = warningMessages([short, damping, capped, bound])
    expect(new Set(texts).size).toBe(SPECTRUM_WARNING_CODES.length)
    expect(texts[0]).toBe(
      '3 periods are shorter than 2Δt = 0.02 s, the shortest the record resolves; ordinates there follow the straight lines between samples.',
    )
    expect(warningMessage({ ...short, periods: 1 })).toMatch(/^1 period is shorter/)
    expect(texts[2]).toBe(
      'For 2 oscillators the cap of 1024 sub-steps stopped short of the accuracy rule (error estimate up to 1.6%).',
    )
    expect(texts[3]).toBe(
      'For 1 oscillator refinement (at most 1024 sub-steps) left the bound on peaks between steps above 0.25%.',
    )
    for (const text of texts) expect(text).not.toMatch(/planSpectrum|undefined|NaN/)
  })

  it('merges the warnings of a run computed in parts into those of the whole run', () => {
    const merged = mergeSpectrumWarnings([
      [short, bound],
      [{ ...capped, errorEstimate: 0.02 }, bound],
      [capped, damping],
    ])
    expect(merged).toEqual([
      short,
      damping,
      { ...capped, oscillators: 4, errorEstimate: 0.02 },
      { ...bound, oscillators: 2 },
    ])
    // The parts' own objects are not changed.
    expect(bound.oscillators).toBe(1)
  })
})

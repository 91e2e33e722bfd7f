import { describe, expect, it } from 'vitest'
import { ROTATION_ANGLE_COUNT, peakAbs, rotD, rotDFromPeaks, rotatedPeaks } from './rotd.js'

// Closed forms for a linearly polarised pair (Boore 2010, BSSA 100(4)): if h₁ = h·cosθ₀ and
// h₂ = h·sinθ₀, then h(θ) = h·cos(θ − θ₀), so the peak at angle θ is |cos(θ − θ₀)|·max|h|.
// Over θ = 0°…179° the largest is max|h| (at θ = θ₀, an integer angle), and the 180 values
// |cos(θ − θ₀)| sorted are 0, cos89° ×2, cos88° ×2, …, cos1° ×2, 1: the 90th and 91st are both
// cos45°, so RotD50 = cos45°·max|h|.

/** A deterministic, decaying, irregular history (a test signal, no physical meaning). */
function signal(n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => {
    const t = i * 0.01
    return Math.exp(-0.3 * t) * (Math.sin(7.1 * t) + 0.6 * Math.sin(2.3 * t + 1) - 0.4 * Math.cos(13.7 * t))
  })
}

function brutePeaks(h1: Float64Array, h2: Float64Array): Float64Array {
  const out = new Float64Array(ROTATION_ANGLE_COUNT)
  for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
    const c = Math.cos((k * Math.PI) / 180)
    const s = Math.sin((k * Math.PI) / 180)
    for (let i = 0; i < h1.length; i++)
      out[k] = Math.max(out[k] as number, Math.abs((h1[i] as number) * c + (h2[i] as number) * s))
  }
  return out
}

describe('rotD of a polarised pair', () => {
  const h = signal(3000)
  const peak = peakAbs(h)

  for (const thetaDeg of [0, 30, 90, 137]) {
    it(`at θ₀ = ${thetaDeg}°: RotD100 = max|h| and RotD50 = cos45°·max|h|`, () => {
      const th = (thetaDeg * Math.PI) / 180
      const { rotD50, rotD100 } = rotD(
        h.map((v) => v * Math.cos(th)),
        h.map((v) => v * Math.sin(th)),
      )
      expect(rotD100).toBeCloseTo(peak, 12)
      expect(rotD50).toBeCloseTo(Math.SQRT1_2 * peak, 12)
    })
  }

  it('between grid angles, RotD100 is cos(0.5°)·max|h| for θ₀ = 30.5°', () => {
    // The nearest sampled angles, 30° and 31°, are 0.5° away from θ₀.
    const th = (30.5 * Math.PI) / 180
    const { rotD100 } = rotD(
      h.map((v) => v * Math.cos(th)),
      h.map((v) => v * Math.sin(th)),
    )
    expect(rotD100).toBeCloseTo(Math.cos((0.5 * Math.PI) / 180) * peak, 12)
  })
})

describe('rotatedPeaks', () => {
  it('equals the brute-force peaks over all samples and angles', () => {
    const a = signal(4000)
    const b = Float64Array.from(signal(4100).subarray(100), (v, i) => v * 0.7 + 0.2 * Math.sin(i * 0.05))
    const fast = rotatedPeaks(a, b)
    const slow = brutePeaks(a, b)
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) expect(fast[k]).toBeCloseTo(slow[k] as number, 14)
  })

  it('gives the same peak in every direction for circular motion', () => {
    // h₁ = cos ωt, h₂ = sin ωt: |cos(ωt − θ)| reaches 1 in every direction when ωt steps by 0.1°.
    const n = 3601
    const h1 = Float64Array.from({ length: n }, (_, i) => Math.cos((i * 0.1 * Math.PI) / 180))
    const h2 = Float64Array.from({ length: n }, (_, i) => Math.sin((i * 0.1 * Math.PI) / 180))
    const { rotD50, rotD100 } = rotD(h1, h2)
    expect(rotD100).toBeCloseTo(1, 12)
    expect(rotD50).toBeCloseTo(1, 12)
  })

  it('refuses histories of different lengths', () => {
    expect(() => rotatedPeaks([1, 2], [1])).toThrow(RangeError)
  })
})

describe('rotDFromPeaks', () => {
  it('takes the median as the mean of the two middle peaks', () => {
    // Peaks 1…180: sorted middle values are 90 and 91 → RotD50 = 90.5; RotD100 = 180.
    const peaks = Float64Array.from({ length: 180 }, (_, i) => 180 - i)
    expect(rotDFromPeaks(peaks)).toEqual({ rotD50: 90.5, rotD100: 180 })
  })
})

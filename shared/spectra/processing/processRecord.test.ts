import { describe, expect, it } from 'vitest'
import { integrateRecord } from '../recordParameters.js'
import { butterworthSos, sosGain } from './butterworthSos.js'
import { fourierAmplitudes, fourierSpectrum, logFrequencies } from './fourierSpectrum.js'
import { filterGain } from './filterGain.js'
import {
  padSamplesFor,
  processingIssues,
  processRecord,
  TRIMMED_PADS_WARNING,
  usablePeriodMaxS,
} from './processRecord.js'

const sampled = (f: (t: number) => number, dtS: number, points: number) =>
  Float64Array.from({ length: points }, (_, i) => f(i * dtS))

function maxAbs(x: Float64Array, from = 0, to = x.length): number {
  let m = 0
  for (let i = from; i < to; i++) m = Math.max(m, Math.abs(x[i]!))
  return m
}

/** A deterministic pseudo-random series (xorshift32), so tests need no global randomness. */
function noise(points: number, seed: number): Float64Array {
  let s = seed >>> 0 || 1
  const out = new Float64Array(points)
  for (let i = 0; i < points; i++) {
    s ^= s << 13
    s >>>= 0
    s ^= s >>> 17
    s ^= s << 5
    s >>>= 0
    out[i] = s / 2 ** 31 - 1
  }
  return out
}

describe('fourierAmplitudes', () => {
  it("satisfies Parseval's theorem: Σa²Δt = (1/N)Σ|X_k|²Δt over all N bins, to 1e-12", () => {
    const dtS = 0.005
    const a = noise(8001, 7)
    const { size, amplitudeMPerS } = fourierAmplitudes(a, dtS)
    let timeEnergy = 0
    for (const v of a) timeEnergy += v * v * dtS
    // A_k = Δt·|X_k|, one-sided: bins 1 … N/2−1 stand for two bins each.
    const half = size / 2
    let freqEnergy = amplitudeMPerS[0]! ** 2 + amplitudeMPerS[half]! ** 2
    for (let k = 1; k < half; k++) freqEnergy += 2 * amplitudeMPerS[k]! ** 2
    freqEnergy /= size * dtS
    expect(Math.abs(freqEnergy / timeEnergy - 1)).toBeLessThan(1e-12)
  })

  it('zero-fills to the next power of two and gives Δt·N·A/2 at the bin of a whole-bin sine (closed form)', () => {
    const dtS = 0.01
    const size = 1024
    const k = 37
    const a = sampled((t) => 2 * Math.sin((2 * Math.PI * k * t) / (size * dtS)), dtS, size)
    const { size: n, amplitudeMPerS, dfHz } = fourierAmplitudes(a, dtS)
    expect(n).toBe(size)
    expect(dfHz).toBeCloseTo(1 / (size * dtS), 14)
    expect(amplitudeMPerS[k]! / ((dtS * size * 2) / 2) - 1).toBeCloseTo(0, 12)
  })
})

describe('fourierSpectrum', () => {
  const dtS = 0.01
  const a = noise(3000, 11)

  it('gives 200 log-spaced frequencies from 1/duration to Nyquist', () => {
    const f = logFrequencies(a.length, dtS)
    expect(f.length).toBe(200)
    expect(f[0]).toBeCloseTo(1 / (2999 * dtS), 12)
    expect(f[199]).toBe(50)
    expect(f[100]! / f[99]!).toBeCloseTo(f[1]! / f[0]!, 10)
  })

  it('smooths with the Konno–Ohmachi window as ΣW·A/ΣW over all bins (Konno & Ohmachi 1998, direct evaluation)', () => {
    const spec = fourierSpectrum(a, dtS)
    const { dfHz, amplitudeMPerS } = fourierAmplitudes(a, dtS)
    for (const j of [0, 57, 120, 199]) {
      const fc = spec.frequencyHz[j]!
      let num = 0
      let den = 0
      for (let k = 1; k < amplitudeMPerS.length; k++) {
        const x = 40 * Math.log10((k * dfHz) / fc)
        const w = x === 0 ? 1 : (Math.sin(x) / x) ** 4
        num += w * amplitudeMPerS[k]!
        den += w
      }
      expect(spec.smoothedMPerS[j]! / (num / den) - 1).toBeCloseTo(0, 9)
      expect(spec.rawMPerS[j]).toBe(amplitudeMPerS[Math.round(fc / dfHz)])
    }
  })
})

describe('processRecord', () => {
  const dtS = 0.01

  it('baseline order 1 removes a constant offset plus a linear trend to round-off on 2,000,000 points', () => {
    const n = 2_000_000
    const a = sampled((t) => 0.37 - 0.0021 * t, dtS, n)
    const out = processRecord(a, dtS, { baseline: { order: 1 } }).accelMPerS2
    expect(maxAbs(out) / maxAbs(a)).toBeLessThan(1e-13)
  })

  it('baseline order 0 removes the mean; order 3 removes a cubic (least squares, exact for a polynomial)', () => {
    const n = 5001
    const a0 = sampled((t) => 0.2 + Math.sin(2 * Math.PI * t), dtS, n)
    const mean = a0.reduce((s, v) => s + v, 0) / n
    const out0 = processRecord(a0, dtS, { baseline: { order: 0 } }).accelMPerS2
    for (const i of [0, 1234, 5000]) expect(out0[i]).toBeCloseTo(a0[i]! - mean, 13)
    const a3 = sampled((t) => 0.1 + 0.02 * t - 0.003 * t * t + 0.0001 * t ** 3, dtS, n)
    expect(maxAbs(processRecord(a3, dtS, { baseline: { order: 3 } }).accelMPerS2)).toBeLessThan(1e-13)
  })

  it('tapers each end with w_i = ½(1 − cos(πi/m)), m = round(taperS/Δt), mirrored at the end', () => {
    const a = new Float64Array(1000).fill(1)
    const out = processRecord(a, dtS, { taperS: 0.5 }).accelMPerS2
    expect(out[0]).toBe(0)
    expect(out[25]).toBeCloseTo(0.5 * (1 - Math.cos((Math.PI * 25) / 50)), 15)
    expect(out[999 - 25]).toBe(out[25])
    expect(out[50]).toBe(1)
    expect(out[500]).toBe(1)
  })

  it('pads each end with 0.75·n/f_c of zeros, n the poles of one pass, f_c the high-pass corner (Converse & Brady 1992 via Boore 2005)', () => {
    expect(padSamplesFor({ highPass: { hz: 0.1, order: 4 }, lowPass: { hz: 25, order: 4 } }, dtS)).toBe(3000)
    expect(padSamplesFor({ lowPass: { hz: 10, order: 6 } }, dtS)).toBe(45)
    expect(padSamplesFor({ highPass: { hz: 0.2, order: 2 }, phase: 'causal' }, dtS)).toBe(0)
    expect(padSamplesFor({ baseline: { order: 1 } }, dtS)).toBe(0)
    const kept = processRecord(noise(4000, 3), dtS, { highPass: { hz: 0.5, order: 3 } })
    expect(kept.padSamples).toBe(450)
    expect(kept.applied.padS).toBeCloseTo(4.5, 12)
    expect(kept.accelMPerS2.length).toBe(4000 + 900)
    expect(kept.startTimeS).toBeCloseTo(-4.5, 12)
    expect(kept.applied.pads).toBe('keep')
    const trimmed = processRecord(noise(4000, 3), dtS, { highPass: { hz: 0.5, order: 3 }, pads: 'trim' })
    expect(trimmed.accelMPerS2.length).toBe(4000)
    expect(trimmed.accelMPerS2).toEqual(kept.accelMPerS2.slice(450, 4450))
    expect(trimmed.warnings).toEqual([TRIMMED_PADS_WARNING])
  })

  it('keeps a pass-band sine within 0.1% in the middle of the record (zero phase)', () => {
    const A = 1.5
    const a = sampled((t) => A * Math.sin(2 * Math.PI * 2 * t), dtS, 6001)
    const out = processRecord(a, dtS, {
      highPass: { hz: 0.1, order: 4 },
      lowPass: { hz: 20, order: 4 },
    })
    const pad = out.padSamples
    let err = 0
    for (let i = 2000; i < 4000; i++) err = Math.max(err, Math.abs(out.accelMPerS2[pad + i]! - a[i]!))
    expect(err / A).toBeLessThan(1e-3)
  })

  it('passes a stop-band sine at |H|² of its amplitude for zero phase and |H| for causal, within 1%', () => {
    const f = 0.25
    const hp = { hz: 0.5, order: 4 }
    const a = sampled((t) => Math.sin(2 * Math.PI * f * t), dtS, 40001)
    const h = sosGain(butterworthSos('highpass', hp.order, hp.hz, dtS), f)
    const zero = processRecord(a, dtS, { highPass: hp })
    const mid = [zero.padSamples + 15000, zero.padSamples + 25000] as const
    expect(maxAbs(zero.accelMPerS2, ...mid) / (h * h) - 1).toBeLessThan(0.01)
    expect(maxAbs(zero.accelMPerS2, ...mid) / (h * h) - 1).toBeGreaterThan(-0.01)
    const causal = processRecord(a, dtS, { highPass: hp, phase: 'causal' })
    expect(Math.abs(maxAbs(causal.accelMPerS2, 15000, 25000) / h - 1)).toBeLessThan(0.01)
    const g = filterGain({ highPass: hp }, dtS, Float64Array.of(f))
    expect(g[0]).toBeCloseTo(h * h, 14)
  })

  it('with kept pads, a zero-phase high-pass leaves an end displacement within 1% of PGD on a drifting record (Boore 2005)', () => {
    // A synthetic motion: three enveloped sines, plus a pre-event offset and a linear drift.
    const a = sampled(
      (t) => {
        const env = t < 2 ? 0 : t < 6 ? (t - 2) / 4 : Math.exp(-(t - 6) / 6)
        const motion =
          env *
          (1.2 * Math.sin(2 * Math.PI * 1.1 * t) +
            0.8 * Math.sin(2 * Math.PI * 2.7 * t + 1) +
            0.5 * Math.sin(2 * Math.PI * 0.45 * t))
        return motion + 0.015 + 0.0004 * t
      },
      dtS,
      4001,
    )
    const before = integrateRecord(a, dtS).dispM
    expect(Math.abs(before[4000]!)).toBeGreaterThan(0.5 * maxAbs(before))
    const out = processRecord(a, dtS, { baseline: { order: 0 }, highPass: { hz: 0.1, order: 4 } })
    const d = integrateRecord(out.accelMPerS2, dtS).dispM
    expect(Math.abs(d[d.length - 1]!)).toBeLessThanOrEqual(0.01 * maxAbs(d))
  })

  it('gives the usable band 1/(1.25·f_hp), null without a high-pass (common practice)', () => {
    expect(usablePeriodMaxS(0.1)).toBeCloseTo(8, 12)
    expect(usablePeriodMaxS(null)).toBeNull()
    expect(
      processRecord(noise(5000, 1), dtS, { highPass: { hz: 0.2, order: 2 } }).usablePeriodMaxS,
    ).toBeCloseTo(4, 12)
  })
})

describe('processingIssues', () => {
  const dtS = 0.01
  const paths = (s: Parameters<typeof processingIssues>[0], points = 5000) =>
    processingIssues(s, points, dtS).map((i) => i.path.join('.'))

  it('names each refused field', () => {
    expect(paths({ lowPass: { hz: 50, order: 4 } })).toEqual(['lowPass.hz'])
    expect(paths({ highPass: { hz: 5, order: 4 }, lowPass: { hz: 5, order: 4 } })).toEqual(['highPass.hz'])
    expect(paths({ highPass: { hz: 1, order: 9 } })).toEqual(['highPass.order'])
    expect(paths({ lowPass: { hz: 1, order: 0 } })).toEqual(['lowPass.order'])
    expect(paths({ baseline: { order: 4 } })).toEqual(['baseline.order'])
    expect(paths({ taperS: 12.5 })).toEqual(['taperS'])
    expect(paths({ taperS: 12.49 })).toEqual([])
    expect(paths({ highPass: { hz: 1, order: 2 }, phase: 'causal', pads: 'keep' })).toEqual(['pads'])
    expect(paths({ highPass: { hz: 0.01, order: 8 } }, 1_900_000)).toEqual(['highPass.hz'])
    expect(paths({ highPass: { hz: 0.1, order: 4 }, lowPass: { hz: 20, order: 4 } })).toEqual([])
  })

  it('makes processRecord throw a RangeError naming the field', () => {
    expect(() => processRecord(noise(100, 1), dtS, { lowPass: { hz: 60, order: 2 } })).toThrow(/lowPass\.hz/)
  })
})

import { describe, expect, it } from 'vitest'
import { decimateMinMax } from './decimateMinMax.js'

const sine = (n: number, periodSamples: number) =>
  Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * i) / periodSamples))

describe('decimateMinMax', () => {
  it('keeps every sample at t = i·dt when the series already fit', () => {
    const s = sine(50, 10)
    const { timeS, series } = decimateMinMax([s], 0.01, 100)
    expect(series[0]).toEqual(s)
    expect(timeS[49]).toBeCloseTo(0.49, 12)
  })

  it('returns at most maxPoints points', () => {
    for (const [n, max] of [
      [100_001, 4000],
      [12_345, 101],
      [5000, 4999],
    ] as const) {
      const { timeS, series } = decimateMinMax([sine(n, 37)], 0.005, max)
      expect(timeS.length).toBeLessThanOrEqual(max)
      expect(series[0]!.length).toBe(timeS.length)
    }
  })

  it('keeps a one-sample spike and a one-sample trough of each series exactly', () => {
    const n = 100_000
    const a = sine(n, 500).map((v) => 0.1 * v)
    const b = sine(n, 800)
    a[31_337] = 7.5
    a[77_001] = -6.25
    b[12] = -3
    const { series } = decimateMinMax([a, b], 0.005, 1000)
    expect(Math.max(...series[0]!)).toBe(7.5)
    expect(Math.min(...series[0]!)).toBe(-6.25)
    expect(Math.min(...series[1]!)).toBe(-3)
    expect(Math.max(...series[1]!)).toBe(Math.max(...b))
  })

  it('places the spike within one bucket of its true time on an evenly spaced axis', () => {
    const n = 10_000
    const dtS = 0.01
    const a = new Float64Array(n)
    a[6543] = 1
    const { timeS, series } = decimateMinMax([a], dtS, 200)
    const bucketS = Math.ceil(n / 100) * dtS
    const at = timeS[series[0]!.indexOf(1)]!
    expect(Math.abs(at - 6543 * dtS)).toBeLessThan(bucketS)
    const spacing = timeS[1]! - timeS[0]!
    for (let i = 1; i < timeS.length; i++) expect(timeS[i]! - timeS[i - 1]!).toBeCloseTo(spacing, 9)
  })

  it('keeps the order in which the low and high of a bucket occur', () => {
    const a = new Float64Array(1000)
    a[10] = 2
    a[11] = -2
    const { series } = decimateMinMax([a], 1, 100)
    // bucket 0 covers samples 0..19: the high (index 10) comes before the low (index 11)
    expect([series[0]![0], series[0]![1]]).toEqual([2, -2])
  })

  it('refuses series of different lengths', () => {
    expect(() => decimateMinMax([new Float64Array(3), new Float64Array(4)], 1, 10)).toThrow(RangeError)
  })
})

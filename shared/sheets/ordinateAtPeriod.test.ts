import { describe, expect, it } from 'vitest'
import { STANDARD_PERIODS_S, ordinateAtPeriod, peakOrdinate } from './ordinateAtPeriod.js'

// A power law S = a·T^b is a straight line on log-log axes, so log-log interpolation
// reproduces it exactly between any two of its points (closed form).
const powerLaw = (t: number) => 2.5 * t ** -0.7

describe('ordinateAtPeriod', () => {
  const grid = [0.04, 0.07, 0.13, 0.31, 0.9, 1, 2.2, 6]
  const values = grid.map(powerLaw)

  it('returns the computed value at a grid period', () => {
    expect(ordinateAtPeriod(grid, values, 1)).toEqual({ kind: 'grid', value: powerLaw(1) })
  })

  it('treats a period within a relative 1e-9 of a grid period as on the grid', () => {
    const reading = ordinateAtPeriod(grid, values, 0.31 * (1 + 1e-12))
    expect(reading.kind).toBe('grid')
  })

  it('interpolates log-log: exact for a power law (closed form)', () => {
    for (const t of [0.05, 0.1, 0.2, 0.5, 1.5, 3, 5]) {
      const reading = ordinateAtPeriod(grid, values, t)
      expect(reading.kind).toBe('interpolated')
      if (reading.kind !== 'interpolated') continue
      expect(reading.value).toBeCloseTo(powerLaw(t), 12)
      expect(reading.fromS).toBeLessThan(t)
      expect(reading.toS).toBeGreaterThan(t)
    }
  })

  it('differs from linear interpolation where the spectrum curves', () => {
    // Between 2.2 s and 6 s, at 4 s: linear in T gives a value above the power law.
    const reading = ordinateAtPeriod(grid, values, 4)
    const linear = powerLaw(2.2) + ((4 - 2.2) / (6 - 2.2)) * (powerLaw(6) - powerLaw(2.2))
    expect(reading.kind === 'interpolated' && reading.value).toBeCloseTo(powerLaw(4), 12)
    expect(Math.abs(linear - powerLaw(4))).toBeGreaterThan(0.01)
  })

  it('finds the neighbours in a grid given in any order', () => {
    const order = [5, 2, 7, 0, 3, 6, 1, 4]
    const shuffled = order.map((i) => grid[i] as number)
    const reading = ordinateAtPeriod(shuffled, shuffled.map(powerLaw), 0.5)
    expect(reading).toMatchObject({ kind: 'interpolated', fromS: 0.31, toS: 0.9 })
  })

  it('does not extrapolate beyond the computed range', () => {
    expect(ordinateAtPeriod(grid, values, 0.03)).toEqual({ kind: 'outside' })
    expect(ordinateAtPeriod(grid, values, 7)).toEqual({ kind: 'outside' })
  })

  it('falls back to linear in ln T where a neighbour is zero', () => {
    // Halfway in ln T between 1 s and 4 s is 2 s: the mean of 0 and 3.
    const reading = ordinateAtPeriod([1, 4], [0, 3], 2)
    expect(reading.kind === 'interpolated' && reading.value).toBeCloseTo(1.5, 12)
  })

  it('rejects mismatched lengths and non-positive periods', () => {
    expect(() => ordinateAtPeriod([1, 2], [1], 1.5)).toThrow(RangeError)
    expect(() => ordinateAtPeriod([1, 2], [1, 2], 0)).toThrow(RangeError)
  })
})

describe('peakOrdinate', () => {
  it('names the largest value and its period', () => {
    expect(peakOrdinate([0.1, 0.2, 0.3], [1, 3, 2])).toEqual({ value: 3, periodS: 0.2 })
  })

  it('keeps the first period on a tie and skips non-finite values', () => {
    expect(peakOrdinate([0.1, 0.2, 0.3], [Number.NaN, 3, 3])).toEqual({ value: 3, periodS: 0.2 })
  })

  it('answers null for an empty spectrum', () => {
    expect(peakOrdinate([], [])).toBeNull()
  })
})

describe('STANDARD_PERIODS_S', () => {
  it('lists the twelve periods of the calc-package table in ascending order', () => {
    expect(STANDARD_PERIODS_S).toEqual([0.05, 0.1, 0.2, 0.3, 0.5, 0.75, 1, 1.5, 2, 3, 4, 5])
  })
})

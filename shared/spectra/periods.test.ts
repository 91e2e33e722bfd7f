import { describe, expect, it } from 'vitest'
import { DEFAULT_PERIOD_GRID, defaultPeriodsS, logPeriodGrid } from './periods.js'

describe('period grids', () => {
  it('the default grid has 301 periods, 100 per decade, hitting 0.01, 0.1, 1 and 10 s exactly', () => {
    const grid = defaultPeriodsS()
    expect(grid).toHaveLength(301)
    expect([grid[0], grid[100], grid[200], grid[300]]).toEqual([0.01, 0.1, 1, 10])
    for (let i = 1; i < grid.length; i++) {
      expect(Math.log10(grid[i]! / grid[i - 1]!)).toBeCloseTo(0.01, 12)
    }
  })

  it('returns copies of the frozen default', () => {
    const grid = defaultPeriodsS()
    grid[0] = 1
    expect(DEFAULT_PERIOD_GRID[0]).toBe(0.01)
    expect(Object.isFrozen(DEFAULT_PERIOD_GRID)).toBe(true)
  })

  it('spaces a custom grid evenly in log period, endpoints included', () => {
    const grid = logPeriodGrid(0.05, 4, 5)
    expect(grid[0]).toBe(0.05)
    expect(grid[4]).toBe(4)
    const ratio = (4 / 0.05) ** 0.25
    for (let i = 1; i < 5; i++) expect(grid[i]! / grid[i - 1]!).toBeCloseTo(ratio, 12)
  })

  it('rejects bad arguments', () => {
    expect(() => logPeriodGrid(0, 1, 10)).toThrow(RangeError)
    expect(() => logPeriodGrid(2, 1, 10)).toThrow(RangeError)
    expect(() => logPeriodGrid(0.1, 1, 2.5)).toThrow(RangeError)
  })
})

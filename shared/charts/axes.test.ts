import { describe, expect, it } from 'vitest'
import { formatTick, logTicks } from './axes.js'

describe('logTicks', () => {
  it('labels each decade of the default 0.01–10 s period grid and grids the multiples between', () => {
    const ticks = logTicks(0.01, 10)
    expect(ticks.labelled).toEqual([0.01, 0.1, 1, 10])
    expect(ticks.grid).toHaveLength(3 * 8)
    expect(ticks.grid.slice(0, 8)).toEqual([0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.09])
  })

  it('labels 1, 2 and 5 × 10^e when the axis spans two decades or less', () => {
    expect(logTicks(0.1, 10).labelled).toEqual([0.1, 0.2, 0.5, 1, 2, 5, 10])
  })

  it('keeps only the ticks inside the domain, free of binary round-off', () => {
    const ticks = logTicks(0.05, 4)
    const all = [...ticks.grid, ...ticks.labelled].sort((a, b) => a - b)
    expect(all[0]).toBe(0.05)
    expect(all[all.length - 1]).toBe(4)
    expect(all).toContain(0.3)
    expect(all).toContain(0.07)
  })

  it('rejects a domain that a log axis cannot show', () => {
    expect(() => logTicks(0, 1)).toThrow(RangeError)
    expect(() => logTicks(1, 1)).toThrow(RangeError)
  })
})

describe('formatTick', () => {
  it('prints short numbers without trailing zeros', () => {
    expect([0.01, 0.5, 1, 2, 10, 0.3].map(formatTick)).toEqual(['0.01', '0.5', '1', '2', '10', '0.3'])
  })
})

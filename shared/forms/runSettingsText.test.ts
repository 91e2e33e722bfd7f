import { describe, expect, it } from 'vitest'
import { periodCountError, periodFieldError, readDecimal, readPeriodList } from './runSettingsText.js'

describe('readDecimal', () => {
  it('reads a comma decimal as a decimal point: "0,005" is 0.005', () => {
    expect(readDecimal('0,005')).toBe(0.005)
    expect(readDecimal(' 0.005 ')).toBe(0.005)
    expect(readDecimal('5e-3')).toBe(0.005)
  })
  it('refuses text that is not one number rather than emptying it', () => {
    expect(readDecimal('0,005,1')).toBeNull()
    expect(readDecimal('abc')).toBeNull()
    expect(readDecimal('')).toBeNull()
    expect(readDecimal('1.2.3')).toBeNull()
  })
})

describe('period fields', () => {
  it('accept 0.01 to 20 s and refuse outside, naming the limits', () => {
    expect(periodFieldError('0.01')).toBeNull()
    expect(periodFieldError('20')).toBeNull()
    expect(periodFieldError('0.005')).toMatch(/0\.01 to 20 s/)
    expect(periodFieldError('25')).toMatch(/0\.01 to 20 s/)
  })
  it('accept 2 to 2000 periods', () => {
    expect(periodCountError('2000')).toBeNull()
    expect(periodCountError('2001')).toMatch(/2 to 2,000/)
    expect(periodCountError('1.5')).toMatch(/whole number/)
  })
  it('read a list separated by spaces or ", " and refuse a repeat', () => {
    expect(readPeriodList('0.1, 0.2 0,5\n1')).toEqual({ periodsS: [0.1, 0.2, 0.5, 1], error: null })
    expect(readPeriodList('0.1 0.1').error).toMatch(/once/)
    expect(readPeriodList('0.1 30').error).toMatch(/“30”/)
  })
})

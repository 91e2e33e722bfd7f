import { describe, expect, it } from 'vitest'
import { TargetCsvError, parseTargetCsv } from './targetCsv.js'

function errorOf(text: string): TargetCsvError {
  try {
    parseTargetCsv(text)
  } catch (err) {
    if (err instanceof TargetCsvError) return err
    throw err
  }
  throw new Error('expected a TargetCsvError')
}

describe('parseTargetCsv', () => {
  it('reads period and Sa pairs after an optional header, skipping comments and blank lines', () => {
    const text = '# site-specific target\nperiod_s,sa_g\n0.1,0.5\n\n0.5,0.8\n1.0,0.4\n'
    expect(parseTargetCsv(text)).toEqual({ periodsS: [0.1, 0.5, 1], saG: [0.5, 0.8, 0.4] })
  })

  it('accepts semicolons and tabs as separators', () => {
    expect(parseTargetCsv('0.1;0.5\n0.2;0.6').saG).toEqual([0.5, 0.6])
    expect(parseTargetCsv('0.1\t0.5\n0.2\t0.6').periodsS).toEqual([0.1, 0.2])
  })

  it('names the line of a non-numeric value', () => {
    const err = errorOf('T,Sa\n0.1,0.5\n0.2,abc\n')
    expect(err.line).toBe(3)
    expect(err.message).toMatch(/Line 3/)
  })

  it('names the line where periods stop increasing', () => {
    expect(errorOf('0.1,0.5\n0.3,0.5\n0.2,0.4\n').line).toBe(3)
  })

  it('refuses a zero or negative period and a one-column row', () => {
    expect(errorOf('0.1,0.5\n0,0.5\n').line).toBe(2)
    expect(errorOf('0.1,0.5\n0.2\n').line).toBe(2)
  })

  it('needs at least two points', () => {
    expect(errorOf('0.1,0.5\n').message).toMatch(/at least two/)
  })

  it('reports an unclosed quote as a CSV error with a line', () => {
    const err = errorOf('0.1,"0.5\n0.2,0.3\n')
    expect(err.message).toMatch(/could not be read/)
    expect(err.line).toBeGreaterThan(0)
  })
})

import { describe, expect, it } from 'vitest'
import { STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'
import { formatSignificant, fromSI, unitsFor } from './units.js'

describe('fromSI', () => {
  it('converts accelerations to g with standard gravity, 9.80665 m/s² (3rd CGPM, 1901)', () => {
    expect(fromSI(STANDARD_GRAVITY_M_PER_S2, 'g')).toBe(1)
    expect(fromSI(4.903325, 'g')).toBeCloseTo(0.5, 12)
  })
  it('converts displacements to mm and velocities to cm/s', () => {
    expect(fromSI(0.0125, 'mm')).toBeCloseTo(12.5, 12)
    expect(fromSI(0.3, 'cm/s')).toBeCloseTo(30, 12)
  })
})

describe('unitsFor', () => {
  it('offers only units of the same kind of motion', () => {
    expect(unitsFor('acceleration')).toEqual(['g', 'm/s²'])
    expect(unitsFor('displacement')).toEqual(['m', 'cm', 'mm', 'in'])
    expect(unitsFor('velocity')).toEqual(['m/s', 'cm/s', 'in/s'])
  })

  it('converts to inches with the international inch, 0.0254 m exactly (1959 agreement)', () => {
    expect(fromSI(0.0254, 'in')).toBe(1)
    expect(fromSI(0.254, 'in/s')).toBeCloseTo(10, 12)
  })
})

describe('formatSignificant', () => {
  it('keeps four significant figures in plain decimals', () => {
    expect(formatSignificant(0.41234)).toBe('0.4123')
    expect(formatSignificant(12.3)).toBe('12.30')
    expect(formatSignificant(1234.56)).toBe('1235')
    expect(formatSignificant(0.00012346)).toBe('0.0001235')
    expect(formatSignificant(9.99996)).toBe('10.00')
    expect(formatSignificant(-2.5, 3)).toBe('-2.50')
    expect(formatSignificant(0)).toBe('0')
    expect(formatSignificant(Number.NaN)).toBe('—')
  })
})

/**
 * Display units for spectra and time histories. Ordinates travel in SI
 * (m/s², m/s, m) and are converted only when drawn or tabulated.
 */

import { METRES_PER_INCH, STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'

export type SpectrumQuantity = 'PSA' | 'SA' | 'PSV' | 'SV' | 'SD'
export type MotionKind = 'acceleration' | 'velocity' | 'displacement'
export type DisplayUnit = 'g' | 'm/s²' | 'm/s' | 'cm/s' | 'in/s' | 'm' | 'cm' | 'mm' | 'in'

/** How many SI units make one display unit, and what the unit measures. */
export const displayUnits: Record<DisplayUnit, { siPerUnit: number; kind: MotionKind }> = {
  g: { siPerUnit: STANDARD_GRAVITY_M_PER_S2, kind: 'acceleration' },
  'm/s²': { siPerUnit: 1, kind: 'acceleration' },
  'm/s': { siPerUnit: 1, kind: 'velocity' },
  'cm/s': { siPerUnit: 0.01, kind: 'velocity' },
  'in/s': { siPerUnit: METRES_PER_INCH, kind: 'velocity' },
  m: { siPerUnit: 1, kind: 'displacement' },
  cm: { siPerUnit: 0.01, kind: 'displacement' },
  mm: { siPerUnit: 0.001, kind: 'displacement' },
  in: { siPerUnit: METRES_PER_INCH, kind: 'displacement' },
}

export const spectrumQuantities: Record<
  SpectrumQuantity,
  { name: string; kind: MotionKind; defaultUnit: DisplayUnit }
> = {
  PSA: { name: 'Pseudo-spectral acceleration', kind: 'acceleration', defaultUnit: 'g' },
  SA: { name: 'Spectral acceleration (absolute)', kind: 'acceleration', defaultUnit: 'g' },
  PSV: { name: 'Pseudo-spectral velocity', kind: 'velocity', defaultUnit: 'm/s' },
  SV: { name: 'Spectral velocity (relative)', kind: 'velocity', defaultUnit: 'm/s' },
  SD: { name: 'Spectral displacement', kind: 'displacement', defaultUnit: 'm' },
}

/** The display units that suit a kind of motion, in the order a menu should list them. */
export function unitsFor(kind: MotionKind): DisplayUnit[] {
  return (Object.keys(displayUnits) as DisplayUnit[]).filter((u) => displayUnits[u].kind === kind)
}

/** Throws when `unit` does not measure `kind` (for example SD in g). */
export function checkUnit(kind: MotionKind, unit: DisplayUnit): void {
  if (displayUnits[unit].kind !== kind) {
    throw new RangeError(`unit ${unit} measures ${displayUnits[unit].kind}, not ${kind}`)
  }
}

/** Converts an SI value (m/s², m/s or m) into `unit`. */
export function fromSI(valueSI: number, unit: DisplayUnit): number {
  return valueSI / displayUnits[unit].siPerUnit
}

/**
 * A number for tables and readouts: `digits` significant figures in plain
 * decimal notation, trailing zeros kept so a column shows its precision.
 */
export function formatSignificant(value: number, digits = 4): string {
  if (!Number.isFinite(value)) return '—'
  const rounded = Number(value.toPrecision(digits))
  if (rounded === 0) return '0'
  const magnitude = Math.floor(Math.log10(Math.abs(rounded)))
  const decimals = Math.max(0, digits - 1 - magnitude)
  return rounded.toFixed(Math.min(decimals, 20))
}

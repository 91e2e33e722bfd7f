/**
 * Units an acceleration record may arrive in, and their size in m/s².
 * Standard gravity g = 9.80665 m/s² (3rd CGPM, 1901); 1 in = 0.0254 m exactly
 * (international yard and pound agreement, 1959); 1 gal = 1 cm/s².
 */
export type SourceUnits = 'g' | 'm/s2' | 'cm/s2' | 'in/s2'

export const SOURCE_UNITS: readonly SourceUnits[] = ['g', 'm/s2', 'cm/s2', 'in/s2']

export const STANDARD_GRAVITY_M_PER_S2 = 9.80665

/** How many m/s² one source unit is. */
export const M_PER_S2_PER_UNIT: Readonly<Record<SourceUnits, number>> = {
  g: STANDARD_GRAVITY_M_PER_S2,
  'm/s2': 1,
  'cm/s2': 0.01,
  'in/s2': 0.0254,
}

export function isSourceUnits(value: string): value is SourceUnits {
  return (SOURCE_UNITS as readonly string[]).includes(value)
}

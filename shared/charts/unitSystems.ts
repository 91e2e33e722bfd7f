import type { UnitSystem } from '../schemas/me.js'
import { METRES_PER_INCH, STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'
import { type DisplayUnit, type MotionKind, type SpectrumQuantity, spectrumQuantities } from './units.js'

/**
 * The units files (CSV and sheets) are written in, by the member's choice. SI keeps every
 * ordinate in m, m/s and m/s²; US customary gives SD in inches, SV and PSV in in/s, and SA and
 * PSA in g (the suites issue).
 */
export const FILE_UNITS: Readonly<Record<UnitSystem, Readonly<Record<MotionKind, DisplayUnit>>>> = {
  si: { acceleration: 'm/s²', velocity: 'm/s', displacement: 'm' },
  us: { acceleration: 'g', velocity: 'in/s', displacement: 'in' },
}

/** The unit a quantity is written in under a unit system. */
export function fileUnitOf(quantity: SpectrumQuantity, system: UnitSystem): DisplayUnit {
  return FILE_UNITS[system][spectrumQuantities[quantity].kind]
}

/** One line stating the units of a file, with the constants its conversions use. */
export function unitsStatement(system: UnitSystem): string {
  return system === 'us'
    ? `Units: US customary: SD in in, SV and PSV in in/s, SA and PSA in g (1 in = ${METRES_PER_INCH} m, g = ${STANDARD_GRAVITY_M_PER_S2} m/s²).`
    : `Units: SI: SD in m, SV and PSV in m/s, SA and PSA in m/s² (PSA also in g, g = ${STANDARD_GRAVITY_M_PER_S2} m/s²).`
}

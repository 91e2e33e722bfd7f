import { formatSignificant } from '../../../shared/charts/units'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../../shared/spectra/units'

/** How each source unit is written, on screen as on sheets. */
export { SOURCE_UNIT_LABELS } from '../../../shared/spectra/units'

/** An acceleration in m/s² as a multiple of standard gravity (9.80665 m/s²). */
export function toG(accelMPerS2: number): number {
  return accelMPerS2 / STANDARD_GRAVITY_M_PER_S2
}

/** Four significant figures, the precision the record pages show. */
export const fmt = (value: number, digits = 4) => formatSignificant(value, digits)

/** A byte count for people: 1.2 MB, 340 kB. */
export function formatBytes(bytes: number): string {
  if (bytes < 1000) return `${bytes} B`
  if (bytes < 1_000_000) return `${fmt(bytes / 1000, 3)} kB`
  return `${fmt(bytes / 1_000_000, 3)} MB`
}

/** A time step as written in a file header: 0.005, 0.01 (no padding zeros, at most six significant figures). */
export function formatDt(dtS: number): string {
  return Number(dtS.toPrecision(6)).toString()
}

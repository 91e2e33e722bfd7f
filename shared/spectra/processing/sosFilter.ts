import type { SosFilter } from './butterworthSos.js'

/**
 * Runs the sections over x in place, forward, from rest (zero state), in transposed direct
 * form II, the form of `scipy.signal.sosfilt`:
 *   y = b0·x + z1;  z1 = b1·x − a1·y + z2;  z2 = b2·x − a2·y.
 * One section at a time over the whole series keeps the loop free of allocation and the
 * coefficients in registers. Stable for the Butterworth designs here (poles inside |z| < 1).
 */
export function sosFilterInPlace(filter: SosFilter, x: Float64Array): void {
  const s = filter.sections
  const n = x.length
  for (let k = 0; k < filter.sectionCount; k++) {
    const r = k * 5
    const b0 = s[r]!
    const b1 = s[r + 1]!
    const b2 = s[r + 2]!
    const a1 = s[r + 3]!
    const a2 = s[r + 4]!
    let z1 = 0
    let z2 = 0
    for (let i = 0; i < n; i++) {
      const xi = x[i]!
      const yi = b0 * xi + z1
      z1 = b1 * xi - a1 * yi + z2
      z2 = b2 * xi - a2 * yi
      x[i] = yi
    }
  }
}

/**
 * Zero-phase ("acausal") filtering in place: y = sosfilt(x), then reverse(sosfilt(reverse(y))),
 * each pass from rest. The magnitude becomes |H|² and the phase cancels. This is not
 * `scipy.signal.sosfiltfilt`, which pads by itself and starts from steady state; the pads
 * here are the caller's (Boore 2005, BSSA 95(2)).
 */
export function sosFilterZeroPhaseInPlace(filter: SosFilter, x: Float64Array): void {
  sosFilterInPlace(filter, x)
  x.reverse()
  sosFilterInPlace(filter, x)
  x.reverse()
}

/**
 * Digital Butterworth filters as second-order sections (Butterworth 1930).
 *
 * Design by the bilinear transform with pre-warping, the same design as
 * `scipy.signal.butter(order, hz, btype, fs=1/Δt, output="sos")`:
 * - analog prototype poles p_k = exp(iπ(2k + n + 1)/(2n)), k = 0 … n−1, on the unit circle;
 * - pre-warped corner W = 2·fs·tan(π·f_c/fs), so the digital corner lands exactly at f_c;
 * - low-pass: s_k = W·p_k with all zeros at z = −1; high-pass: s_k = W/p_k with all zeros at z = +1;
 * - bilinear map z = (2fs + s)/(2fs − s).
 * Conjugate poles pair into second-order sections; an odd order adds one first-order section.
 * Each section is scaled to unit gain at DC (low-pass) or Nyquist (high-pass), where a
 * Butterworth filter's gain is exactly 1, so the cascade has |H(f_c)| = 1/√2 for one pass.
 */

export type FilterKind = 'highpass' | 'lowpass'

/** Sections as rows [b0, b1, b2, a1, a2] with a0 = 1, laid out flat. */
export interface SosFilter {
  kind: FilterKind
  order: number
  cornerHz: number
  sampleRateHz: number
  sections: Float64Array
  sectionCount: number
}

export const MIN_FILTER_ORDER = 1
export const MAX_FILTER_ORDER = 8

export function butterworthSos(kind: FilterKind, order: number, cornerHz: number, dtS: number): SosFilter {
  if (!Number.isInteger(order) || order < MIN_FILTER_ORDER || order > MAX_FILTER_ORDER)
    throw new RangeError(`order must be a whole number from ${MIN_FILTER_ORDER} to ${MAX_FILTER_ORDER}`)
  if (!(dtS > 0 && Number.isFinite(dtS))) throw new RangeError('dtS must be a positive number of seconds')
  const fs = 1 / dtS
  if (!(cornerHz > 0 && cornerHz < fs / 2)) throw new RangeError('cornerHz must lie between 0 and Nyquist')

  const warped = 2 * fs * Math.tan((Math.PI * cornerHz) / fs)
  const fs2 = 2 * fs
  const zeroSign = kind === 'lowpass' ? -1 : 1 // the zeros sit at z = zeroSign
  const sectionCount = Math.ceil(order / 2)
  const sections = new Float64Array(sectionCount * 5)

  // Upper-half-plane prototype poles (k < n/2) pair with their conjugates; for odd n the
  // pole at k = (n−1)/2 is the real pole −1.
  for (let k = 0; k < sectionCount; k++) {
    const theta = (Math.PI * (2 * k + order + 1)) / (2 * order)
    let re = Math.cos(theta)
    let im = Math.sin(theta)
    if (kind === 'lowpass') {
      re *= warped
      im *= warped
    } else {
      // W / p = W·conj(p) for |p| = 1
      re *= warped
      im *= -warped
    }
    // z = (fs2 + s)/(fs2 − s)
    const nr = fs2 + re
    const ni = im
    const dr = fs2 - re
    const di = -im
    const den = dr * dr + di * di
    const zr = (nr * dr + ni * di) / den
    const zi = (ni * dr - nr * di) / den
    const row = k * 5
    const isReal = 2 * k + 1 === order
    let b0: number, b1: number, b2: number, a1: number, a2: number
    if (isReal) {
      b0 = 1
      b1 = -zeroSign
      b2 = 0
      a1 = -zr
      a2 = 0
    } else {
      b0 = 1
      b1 = -2 * zeroSign
      b2 = 1
      a1 = -2 * zr
      a2 = zr * zr + zi * zi
    }
    // Unit gain at z = 1 (DC) for a low-pass, z = −1 (Nyquist) for a high-pass.
    const zRef = -zeroSign
    const gain = (1 + a1 * zRef + a2) / (b0 + b1 * zRef + b2)
    sections[row] = b0 * gain
    sections[row + 1] = b1 * gain
    sections[row + 2] = b2 * gain
    sections[row + 3] = a1
    sections[row + 4] = a2
  }
  return { kind, order, cornerHz, sampleRateHz: fs, sections, sectionCount }
}

/** |H(f)| of one forward pass of the sections at frequency f (Hz), from H(z) on the unit circle. */
export function sosGain(filter: SosFilter, frequencyHz: number): number {
  const w = (2 * Math.PI * frequencyHz) / filter.sampleRateHz
  const c1 = Math.cos(w)
  const s1 = Math.sin(w)
  const c2 = Math.cos(2 * w)
  const s2 = Math.sin(2 * w)
  let gain = 1
  const s = filter.sections
  for (let k = 0; k < filter.sectionCount; k++) {
    const r = k * 5
    // H = (b0 + b1 z⁻¹ + b2 z⁻²)/(1 + a1 z⁻¹ + a2 z⁻²), z⁻¹ = e^(−iw)
    const nr = s[r]! + s[r + 1]! * c1 + s[r + 2]! * c2
    const ni = -(s[r + 1]! * s1 + s[r + 2]! * s2)
    const dr = 1 + s[r + 3]! * c1 + s[r + 4]! * c2
    const di = -(s[r + 3]! * s1 + s[r + 4]! * s2)
    gain *= Math.sqrt((nr * nr + ni * ni) / (dr * dr + di * di))
  }
  return gain
}

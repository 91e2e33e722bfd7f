import FFT from 'fft.js'

export interface FourierAmplitudes {
  /** Transform length: the record zero-filled to a power of two. */
  size: number
  /** Bin spacing 1/(size·Δt), Hz. */
  dfHz: number
  /** One-sided Δt·|X_k|, k = 0 … size/2, m/s. */
  amplitudeMPerS: Float64Array
}

export interface FourierSpectrum {
  frequencyHz: Float64Array
  /** Δt·|X_k| at the nearest bin, m/s. */
  rawMPerS: Float64Array
  /** Konno–Ohmachi (b = 40) weighted mean of the amplitudes over all bins, m/s. */
  smoothedMPerS: Float64Array
}

export const FOURIER_POINTS = 200
export const KONNO_OHMACHI_B = 40

function nextPowerOfTwo(n: number): number {
  let p = 2
  while (p < n) p *= 2
  return p
}

/**
 * One-sided Fourier amplitudes |A(f_k)| = Δt·|X_k| of the record zero-filled to a power of two,
 * X_k = Σ a_i e^(−2πik/N), by fft.js's radix-4 real transform. Parseval's theorem checks it:
 * Σa²Δt = (1/N)Σ|X_k|²Δt over all N bins.
 */
export function fourierAmplitudes(accelMPerS2: Float64Array, dtS: number): FourierAmplitudes {
  if (!(Number.isFinite(dtS) && dtS > 0)) throw new RangeError('dtS must be a positive number of seconds')
  if (accelMPerS2.length < 2) throw new RangeError('the record needs at least two samples')
  const size = nextPowerOfTwo(accelMPerS2.length)
  const input = new Float64Array(size)
  input.set(accelMPerS2)
  const out = new Float64Array(2 * size)
  new FFT(size).realTransform(out, input)
  const half = size / 2
  const amplitudeMPerS = new Float64Array(half + 1)
  for (let k = 0; k <= half; k++) {
    const re = out[2 * k]!
    const im = out[2 * k + 1]!
    amplitudeMPerS[k] = dtS * Math.sqrt(re * re + im * im)
  }
  return { size, dfHz: 1 / (size * dtS), amplitudeMPerS }
}

/** `count` log-spaced frequencies from 1/duration to Nyquist, Hz. */
export function logFrequencies(points: number, dtS: number, count = FOURIER_POINTS): Float64Array {
  const nyquistHz = 1 / (2 * dtS)
  const loHz = Math.min(1 / ((points - 1) * dtS), nyquistHz)
  const out = new Float64Array(count)
  const ratio = Math.log(nyquistHz / loHz)
  for (let j = 0; j < count; j++) out[j] = loHz * Math.exp((ratio * j) / Math.max(1, count - 1))
  out[count - 1] = nyquistHz
  return out
}

/**
 * The Fourier amplitude spectrum at about 200 log-spaced frequencies from 1/duration to Nyquist:
 * raw (the nearest bin) and smoothed with the Konno–Ohmachi window (Konno & Ohmachi 1998, BSSA
 * 88(1)) W = [sin(b·x)/(b·x)]⁴, x = log10(f/f_c), b = 40, as ΣW·A/ΣW over every bin but DC.
 * sin(b·x) comes from sin and cos of b·log10 f precomputed per bin (angle subtraction), so the
 * double sum needs no transcendental call per term.
 */
export function fourierSpectrum(
  accelMPerS2: Float64Array,
  dtS: number,
  count = FOURIER_POINTS,
): FourierSpectrum {
  const { dfHz, amplitudeMPerS } = fourierAmplitudes(accelMPerS2, dtS)
  const frequencyHz = logFrequencies(accelMPerS2.length, dtS, count)
  const bins = amplitudeMPerS.length
  const b = KONNO_OHMACHI_B
  const logF = new Float64Array(bins)
  const sinB = new Float64Array(bins)
  const cosB = new Float64Array(bins)
  for (let k = 1; k < bins; k++) {
    const l = Math.log10(k * dfHz)
    logF[k] = l
    sinB[k] = Math.sin(b * l)
    cosB[k] = Math.cos(b * l)
  }
  const rawMPerS = new Float64Array(count)
  const smoothedMPerS = new Float64Array(count)
  for (let j = 0; j < count; j++) {
    const fc = frequencyHz[j]!
    rawMPerS[j] = amplitudeMPerS[Math.min(bins - 1, Math.round(fc / dfHz))]!
    const lc = Math.log10(fc)
    const sc = Math.sin(b * lc)
    const cc = Math.cos(b * lc)
    let num = 0
    let den = 0
    for (let k = 1; k < bins; k++) {
      const bx = b * (logF[k]! - lc)
      let w: number
      if (Math.abs(bx) < 1e-3) {
        // sin(u)/u = 1 − u²/6 + O(u⁴)
        const r = 1 - (bx * bx) / 6
        w = r * r * r * r
      } else {
        const r = (sinB[k]! * cc - cosB[k]! * sc) / bx
        const r2 = r * r
        w = r2 * r2
      }
      num += w * amplitudeMPerS[k]!
      den += w
    }
    smoothedMPerS[j] = den > 0 ? num / den : 0
  }
  return { frequencyHz, rawMPerS, smoothedMPerS }
}

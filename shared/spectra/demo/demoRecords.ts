/**
 * Synthetic demo records, generated deterministically from a seeded PRNG.
 * They are not recordings of any earthquake and are labelled synthetic.
 *
 * Each record is the second derivative of a ground displacement built as
 *   d(t) = E(t)·Σ_k A_k sin(ω_k t + φ_k)  (+ a pulse for the near-fault record),
 * so ground velocity and displacement start and end at rest (no baseline
 * drift). E is a smooth envelope with E, E' and E'' zero at both ends. The
 * amplitudes follow a Kanai–Tajimi acceleration spectrum (Kanai 1957, Tajimi
 * 1960) with a Clough–Penzien high-pass (Clough & Penzien 1975), ground
 * frequency ω_g and ratio ζ_g: A_k = √(2·S(ω_k)·Δω)/ω_k². The acceleration is
 * scaled to the stated PGA and printed to six significant figures in a layout
 * the record parser reads; scripts/generateDemoRecords.ts writes the files
 * beside this module, and a test checks they match.
 */
import { STANDARD_GRAVITY_M_PER_S2 } from '../units.js'

export interface DemoRecord {
  id: string
  name: string
  description: string
  synthetic: true
  fileName: string
  points: number
  dtS: number
  /** The record as text, in one of the layouts parseRecord reads. */
  text: string
}

/** mulberry32: a small, fast 32-bit PRNG with a good spread, seeded for repeatability. */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0
  return () => {
    state = (state + 0x6d2b79f5) >>> 0
    let t = state
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

interface Envelope {
  /** E, E', E'' at t. */
  at(t: number): [number, number, number]
}

/**
 * A Saragoni–Hart type envelope g(t) = (t/t_p)^β·e^(β(1 − t/t_p)) (Saragoni & Hart 1974),
 * peaking at 1 when t = t_p, times a quintic smoothstep q that tapers it to zero
 * over the last `taperS` seconds. With β ≥ 3, E, E' and E'' vanish at both ends.
 */
function envelope(peakS: number, beta: number, taperS: number, endS: number): Envelope {
  // q(x) = 10x³ − 15x⁴ + 6x⁵, x = (end − t)/taper, with q(0) = 0, q(1) = 1 and q', q'' zero at both ends.
  const taper = (t: number): [number, number, number] => {
    const x = (endS - t) / taperS
    if (x >= 1) return [1, 0, 0]
    if (x <= 0) return [0, 0, 0]
    const q = x ** 3 * (10 - 15 * x + 6 * x * x)
    const dq = 30 * x * x * (1 - x) ** 2
    const ddq = 60 * x * (1 - x) * (1 - 2 * x)
    return [q, -dq / taperS, ddq / (taperS * taperS)]
  }
  return {
    at(t) {
      if (t <= 0) return [0, 0, 0]
      const g = (t / peakS) ** beta * Math.exp(beta * (1 - t / peakS))
      const rate = beta / t - beta / peakS
      const dg = g * rate
      const ddg = g * (rate * rate - beta / (t * t))
      const [q, dq, ddq] = taper(t)
      return [g * q, dg * q + g * dq, ddg * q + 2 * dg * dq + g * ddq]
    },
  }
}

interface Spectrum {
  groundHz: number
  groundRatio: number
  highPassHz: number
  minHz: number
  maxHz: number
  components: number
}

/** Kanai–Tajimi spectral density with a Clough–Penzien high-pass, up to a constant. */
function spectralDensity(omega: number, s: Spectrum): number {
  const wg = 2 * Math.PI * s.groundHz
  const wf = 2 * Math.PI * s.highPassHz
  const kt =
    (wg ** 4 + 4 * s.groundRatio ** 2 * wg ** 2 * omega ** 2) /
    ((wg ** 2 - omega ** 2) ** 2 + 4 * s.groundRatio ** 2 * wg ** 2 * omega ** 2)
  const cp = omega ** 4 / ((wf ** 2 - omega ** 2) ** 2 + 4 * 0.6 ** 2 * wf ** 2 * omega ** 2)
  return kt * cp
}

interface Pulse {
  /** Centre time, period and peak displacement scale of a Gabor displacement pulse. */
  centreS: number
  periodS: number
  widthS: number
  weight: number
}

interface RecordRecipe {
  seed: number
  points: number
  dtS: number
  pgaG: number
  envelope: Envelope
  spectrum: Spectrum
  pulse?: Pulse
}

/** Ground acceleration in g, scaled so that its peak is exactly pgaG before printing. */
function synthesise(recipe: RecordRecipe): Float64Array {
  const random = mulberry32(recipe.seed)
  const { spectrum } = recipe
  const n = spectrum.components
  const omegas = new Float64Array(n)
  const amplitudes = new Float64Array(n)
  const phases = new Float64Array(n)
  const logMin = Math.log(spectrum.minHz)
  const logMax = Math.log(spectrum.maxHz)
  for (let k = 0; k < n; k++) {
    // Log-spaced frequencies, each jittered within its band so the sum does not repeat.
    const hz = Math.exp(logMin + ((logMax - logMin) * (k + random())) / n)
    const omega = 2 * Math.PI * hz
    const bandWidth = omega * ((logMax - logMin) / n)
    omegas[k] = omega
    amplitudes[k] = Math.sqrt(2 * spectralDensity(omega, spectrum) * bandWidth) / (omega * omega)
    phases[k] = 2 * Math.PI * random()
  }
  const accel = new Float64Array(recipe.points)
  let noisePeak = 0
  for (let i = 0; i < recipe.points; i++) {
    const t = i * recipe.dtS
    let s = 0
    let ds = 0
    let dds = 0
    for (let k = 0; k < n; k++) {
      const w = omegas[k]!
      const a = amplitudes[k]!
      const phase = w * t + phases[k]!
      const sin = Math.sin(phase)
      const cos = Math.cos(phase)
      s += a * sin
      ds += a * w * cos
      dds -= a * w * w * sin
    }
    const [e, de, dde] = recipe.envelope.at(t)
    accel[i] = dde * s + 2 * de * ds + e * dds
    noisePeak = Math.max(noisePeak, Math.abs(accel[i]!))
  }
  if (recipe.pulse) {
    // Gabor pulse in displacement, d = exp(−x²)·sin(ω_p τ), x = τ/width, added at `weight` of the noise's PGA.
    const { centreS, periodS, widthS, weight } = recipe.pulse
    const wp = (2 * Math.PI) / periodS
    const pulse = new Float64Array(recipe.points)
    let pulsePeak = 0
    for (let i = 0; i < recipe.points; i++) {
      const tau = i * recipe.dtS - centreS
      const g = Math.exp(-((tau / widthS) ** 2))
      const dg = ((-2 * tau) / widthS ** 2) * g
      const ddg = ((4 * tau * tau) / widthS ** 4 - 2 / widthS ** 2) * g
      const sin = Math.sin(wp * tau)
      const cos = Math.cos(wp * tau)
      pulse[i] = ddg * sin + 2 * dg * wp * cos - g * wp * wp * sin
      pulsePeak = Math.max(pulsePeak, Math.abs(pulse[i]!))
    }
    for (let i = 0; i < recipe.points; i++) accel[i]! += (weight * noisePeak * pulse[i]!) / pulsePeak
  }
  let peak = 0
  for (const value of accel) peak = Math.max(peak, Math.abs(value))
  for (let i = 0; i < recipe.points; i++) accel[i] = (accel[i]! * recipe.pgaG) / peak
  return accel
}

function valuesBlock(values: Float64Array, perLine: number): string[] {
  const lines: string[] = []
  for (let i = 0; i < values.length; i += perLine) {
    lines.push(Array.from(values.subarray(i, i + perLine), (value) => formatValue(value)).join('  '))
  }
  return lines
}

/** Six significant figures, exponent form, fixed width. */
function formatValue(value: number): string {
  const text = value.toExponential(5)
  return value < 0 ? text : ` ${text}`
}

const DEMO_RECIPES = [
  {
    id: 'synthetic-far-field',
    name: 'Synthetic far-field noise',
    description:
      'Synthetic record (not a recording): filtered noise under a 40 s envelope, ground frequency 2.5 Hz, PGA 0.25 g.',
    fileName: 'synthetic-far-field.txt',
    recipe: {
      seed: 20_240_611,
      points: 8001,
      dtS: 0.005,
      pgaG: 0.25,
      envelope: envelope(8, 3, 5, 40),
      spectrum: { groundHz: 2.5, groundRatio: 0.6, highPassHz: 0.25, minHz: 0.1, maxHz: 30, components: 160 },
    },
    layout: (accel: Float64Array) => [
      'Ordinate demo record: synthetic far-field noise (synthetic, not a recording)',
      'Generated by the Ordinate demo generator; not a recording of any earthquake',
      'Ground acceleration, in units of g',
      'NPTS=  8001, DT= 0.00500 SEC',
      ...valuesBlock(accel, 5),
    ],
  },
  {
    id: 'synthetic-near-fault-pulse',
    name: 'Synthetic near-fault pulse',
    description:
      'Synthetic record (not a recording): filtered noise with a 1.6 s displacement pulse near 6 s, 20 s long, PGA 0.40 g.',
    fileName: 'synthetic-near-fault-pulse.csv',
    recipe: {
      seed: 19_990_917,
      points: 4001,
      dtS: 0.005,
      pgaG: 0.4,
      envelope: envelope(4, 3, 3, 20),
      spectrum: { groundHz: 4, groundRatio: 0.5, highPassHz: 0.3, minHz: 0.15, maxHz: 30, components: 120 },
      pulse: { centreS: 6, periodS: 1.6, widthS: 1.1, weight: 1.2 },
    },
    layout: (accel: Float64Array) => [
      '# Ordinate demo record: synthetic near-fault pulse (synthetic, not a recording)',
      'time (s),acceleration (g)',
      ...Array.from(accel, (value, i) => `${(i * 0.005).toFixed(3)},${formatValue(value).trim()}`),
    ],
  },
  {
    id: 'synthetic-long-duration',
    name: 'Synthetic long-duration',
    description:
      'Synthetic record (not a recording): low-frequency filtered noise under a 120 s envelope, ground frequency 1.2 Hz, PGA 0.12 g.',
    fileName: 'synthetic-long-duration.txt',
    recipe: {
      seed: 20_110_311,
      points: 12_001,
      dtS: 0.01,
      pgaG: 0.12,
      envelope: envelope(30, 3, 15, 120),
      spectrum: {
        groundHz: 1.2,
        groundRatio: 0.4,
        highPassHz: 0.12,
        minHz: 0.05,
        maxHz: 20,
        components: 160,
      },
    },
    layout: (accel: Float64Array) => {
      const cm = accel.map((g) => g * STANDARD_GRAVITY_M_PER_S2 * 100)
      return [
        '# Ordinate demo record: synthetic long-duration (synthetic, not a recording)',
        '# points: 12001',
        '# dt = 0.01 s',
        '# units: cm/s^2',
        ...valuesBlock(cm, 8),
      ]
    },
  },
] as const

export type DemoRecordId = (typeof DEMO_RECIPES)[number]['id']

export const DEMO_RECORD_IDS: readonly DemoRecordId[] = DEMO_RECIPES.map((entry) => entry.id)

/** One demo record, generated on demand (a few tens of milliseconds). */
export function demoRecord(id: DemoRecordId): DemoRecord {
  const entry = DEMO_RECIPES.find((candidate) => candidate.id === id)
  if (!entry) throw new RangeError(`unknown demo record ${id}`)
  const accel = synthesise(entry.recipe)
  return {
    id: entry.id,
    name: entry.name,
    description: entry.description,
    synthetic: true,
    fileName: entry.fileName,
    points: entry.recipe.points,
    dtS: entry.recipe.dtS,
    text: entry.layout(accel).join('\n') + '\n',
  }
}

/** The three synthetic demo records; the first is the standard job's (8,001 points at Δt = 0.005 s). */
export function demoRecords(): DemoRecord[] {
  return DEMO_RECORD_IDS.map(demoRecord)
}

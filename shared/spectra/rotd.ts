/**
 * Orientation-independent combinations of two horizontal components (Boore 2010, BSSA 100(4),
 * "Orientation-independent, nongeometric-mean measures of seismic intensity from two horizontal
 * components of motion").
 *
 * The oscillator is linear, so the response to the rotated ground motion
 * a(θ,t) = a₁(t)cosθ + a₂(t)sinθ is u(θ,t) = u₁(t)cosθ + u₂(t)sinθ: each oscillator is solved
 * once per component, and the rotation is applied to the two response histories. RotDnn is the
 * nn-th percentile over the angles θ = 0°, 1°, …, 179° of the peak max_t |u(θ,t)|: RotD100 the
 * largest, RotD50 the median (the mean of the 90th and 91st of the 180 sorted peaks — the even-count
 * median convention is from memory).
 */

import type { Combination } from '../vocabulary/combinations.js'
import type { OrdinatePeaks } from './computeSpectrum.js'
import { freeVibrationTailPeaks } from './freeVibration.js'
import { type HistoryFold, PAIR_COEFFICIENTS, type SweepKernel } from './kernel/sweepKernel.js'
import { type SpectrumMethod, recurrenceCoefficients } from './oscillatorRecurrence.js'
import type { OscillatorSpec } from './sweepOscillators.js'

/** Angles 0°–179° in 1° steps (Boore 2010): 180 non-redundant orientations. */
export const ROTATION_ANGLE_COUNT = 180

/** Direction cosines; 90° is set exactly (cos = 0, sin = 1) so that angle is the second component itself. */
const COS = new Float64Array(ROTATION_ANGLE_COUNT)
const SIN = new Float64Array(ROTATION_ANGLE_COUNT)
for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
  COS[k] = k === 90 ? 0 : Math.cos((k * Math.PI) / 180)
  SIN[k] = k === 90 ? 1 : Math.sin((k * Math.PI) / 180)
}
/** Index of the 90° direction: the second component's own peak. */
const SECOND_COMPONENT = 90

/** Directions around the full circle: j and j + 180 are opposite, with the same peak. */
const FULL_TURN = 2 * ROTATION_ANGLE_COUNT
/** The polygon is rebuilt after this many raised samples (a stale one is still exact, only looser). */
const RAISES_PER_REBUILD = 16

/**
 * Running peaks max_t |x(t)cosθ + y(t)sinθ| over θ = 0°…179° of a pair of histories fed one
 * sample at a time (add) or a block at a time (addMany, which feeds the block's extreme samples
 * first). Exact, and fast because most samples cannot raise any peak:
 * - |x cosθ + y sinθ| ≤ √(x² + y²), so a sample inside the circle of the smallest peak is skipped;
 * - the samples that set the peaks, with their mirror images, span a convex polygon Q inside the
 *   convex hull of every sample so far; a sample inside Q is a convex combination of earlier
 *   samples, so it cannot raise any peak and is skipped. Q's vertices are in angular order, so
 *   finding the edge facing a sample is a short walk from the edge that faced the previous one;
 * - a sample p outside Q can only beat Q's support h_Q(θ) (≤ the peak) on one arc of directions,
 *   the normals of the part of Q it sees, and that arc holds the normal of the edge it faces. The
 *   sampled directions in the arc are contiguous and include one of the two directions beside that
 *   normal (the last one set by the edge's first vertex, the first one set by the next), so the
 *   search walks outward from those two while p·d > h_Q and raises any peak p beats on the way.
 * Q is rebuilt from the current setters every few samples that raised a peak; between rebuilds it
 * is older and smaller, which keeps every test exact and only makes it looser.
 */
export class DirectionalPeaks {
  /** The peak in each direction θ = k°, k = 0…179. */
  readonly peaks = new Float64Array(ROTATION_ANGLE_COUNT)
  /** The sample (signed so its projection is positive) that set each peak. */
  private readonly setterX = new Float64Array(ROTATION_ANGLE_COUNT)
  private readonly setterY = new Float64Array(ROTATION_ANGLE_COUNT)
  /** The peaks when Q was built: Q's support in each direction. */
  private readonly builtPeaks = new Float64Array(ROTATION_ANGLE_COUNT)
  /** Q's vertices, counter-clockwise without repeats, and the first direction (0…359) each one set. */
  private readonly vertexX = new Float64Array(FULL_TURN)
  private readonly vertexY = new Float64Array(FULL_TURN)
  private readonly vertexFirstDirection = new Int32Array(FULL_TURN)
  private vertices = 0
  private edge = 0
  private floor2 = 0
  private raisesSinceBuild = 0
  /** The block's largest projections on the seed axes (both ways) and the samples that reach them. */
  private readonly seedValue = new Float64Array(2 * SEED_AXES)
  private readonly seedIndex = new Int32Array(2 * SEED_AXES)
  /** Whether the current sample raised a peak (set by visit). */
  private raised = false

  reset(): void {
    this.peaks.fill(0)
    this.setterX.fill(0)
    this.setterY.fill(0)
    this.builtPeaks.fill(0)
    this.vertices = 0
    this.edge = 0
    this.floor2 = 0
    this.raisesSinceBuild = 0
  }

  add(x: number, y: number): void {
    if (x * x + y * y > this.floor2) this.addOutsideFloor(x, y)
  }

  /**
   * Adds samples (xs[i], ys[i]) for i < count. The peaks are a maximum over a set of samples, so
   * the order does not change them: the block's extreme samples along 0°, 45°, 90° and 135° (both
   * ways; among every fourth sample) go first and Q is rebuilt around them, so that most of the block then falls inside Q or
   * the floor circle and is skipped (a tight loop, the rest out of line).
   */
  addMany(xs: Float64Array, ys: Float64Array, count: number): void {
    if (count > SEEDED_BLOCK) {
      const best = this.seedValue
      const at = this.seedIndex
      best.fill(-Infinity)
      at.fill(0)
      for (let i = 0; i < count; i += SEED_STRIDE) {
        const x = xs[i] as number
        const y = ys[i] as number
        for (let axis = 0; axis < SEED_AXES; axis++) {
          const projection = x * (SEED_X[axis] as number) + y * (SEED_Y[axis] as number)
          if (projection > (best[axis] as number)) {
            best[axis] = projection
            at[axis] = i
          }
          if (-projection > (best[axis + SEED_AXES] as number)) {
            best[axis + SEED_AXES] = -projection
            at[axis + SEED_AXES] = i
          }
        }
      }
      for (let seed = 0; seed < 2 * SEED_AXES; seed++) {
        const i = at[seed] as number
        this.add(xs[i] as number, ys[i] as number)
      }
      if (this.raisesSinceBuild > 0) this.rebuild()
    }
    const vx = this.vertexX
    const vy = this.vertexY
    for (let i = 0; i < count; i++) {
      const x = xs[i] as number
      const y = ys[i] as number
      if (x * x + y * y <= this.floor2) continue
      // In line, the first test of facingEdge: inside Q through the edge that faced the last sample.
      const n = this.vertices
      if (n >= 3) {
        const e = this.edge
        const next = e + 1 === n ? 0 : e + 1
        const x0 = vx[e] as number
        const y0 = vy[e] as number
        const x1 = vx[next] as number
        const y1 = vy[next] as number
        if (x0 * y - y0 * x >= 0 && x1 * y - y1 * x <= 0 && (x1 - x0) * (y - y0) - (y1 - y0) * (x - x0) >= 0)
          continue
      }
      this.addOutsideFloor(x, y)
    }
  }

  private addOutsideFloor(x: number, y: number): void {
    if (this.vertices < 3) {
      this.raiseEverywhere(x, y)
      return
    }
    const facing = this.facingEdge(x, y)
    if (facing === INSIDE) return
    if (facing === UNKNOWN) this.raiseEverywhere(x, y)
    else this.raiseAround(x, y, facing)
  }

  /**
   * INSIDE when (x, y) is inside Q; else the index of the edge it lies beyond; UNKNOWN when the walk
   * finds no wedge (a polygon too thin to tell, for a nearly polarised motion).
   */
  private facingEdge(x: number, y: number): number {
    const vx = this.vertexX
    const vy = this.vertexY
    const n = this.vertices
    let e = this.edge
    for (let steps = 0; steps <= n; steps++) {
      const next = e + 1 === n ? 0 : e + 1
      const x0 = vx[e] as number
      const y0 = vy[e] as number
      if (x0 * y - y0 * x < 0) {
        e = e === 0 ? n - 1 : e - 1
        continue
      }
      const x1 = vx[next] as number
      const y1 = vy[next] as number
      if (x1 * y - y1 * x > 0) {
        e = next
        continue
      }
      this.edge = e
      return (x1 - x0) * (y - y0) - (y1 - y0) * (x - x0) >= 0 ? INSIDE : e
    }
    return UNKNOWN
  }

  /** Raises direction j (0…359) if (x, y) beats it; returns whether (x, y) beats Q's support there. */
  private visit(x: number, y: number, j: number): boolean {
    const k = j < ROTATION_ANGLE_COUNT ? j : j - ROTATION_ANGLE_COUNT
    const projection = x * (COS[k] as number) + y * (SIN[k] as number)
    const along = j < ROTATION_ANGLE_COUNT ? projection : -projection
    if (!(along > (this.builtPeaks[k] as number))) return false
    if (along > (this.peaks[k] as number)) {
      this.setPeak(k, x, y, projection)
      this.raised = true
    }
    return true
  }

  private setPeak(k: number, x: number, y: number, projection: number): void {
    this.peaks[k] = Math.abs(projection)
    this.setterX[k] = projection >= 0 ? x : -x
    this.setterY[k] = projection >= 0 ? y : -y
  }

  /** Walks outward from the two directions beside the facing edge's normal (see the class comment). */
  private raiseAround(x: number, y: number, edge: number): void {
    const next = edge + 1 === this.vertices ? 0 : edge + 1
    const after = this.vertexFirstDirection[next] as number
    const before = after === 0 ? FULL_TURN - 1 : after - 1
    this.raised = false
    let j = after
    for (let count = 0; count < FULL_TURN && this.visit(x, y, j); count++) j = j + 1 === FULL_TURN ? 0 : j + 1
    j = before
    for (let count = 0; count < FULL_TURN && this.visit(x, y, j); count++) j = j === 0 ? FULL_TURN - 1 : j - 1
    if (this.raised) this.afterRaise()
  }

  private raiseEverywhere(x: number, y: number): void {
    let raised = false
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const projection = x * (COS[k] as number) + y * (SIN[k] as number)
      if (Math.abs(projection) > (this.peaks[k] as number)) {
        this.setPeak(k, x, y, projection)
        raised = true
      }
    }
    if (raised) this.afterRaise()
  }

  /** Counts a sample that raised a peak; Q is rebuilt only then (unchanged setters give the same Q). */
  private afterRaise(): void {
    this.raisesSinceBuild++
    if (this.vertices < 3 || this.raisesSinceBuild >= RAISES_PER_REBUILD) this.rebuild()
  }

  /** Q from the current setters: θ = 0°…179°, then their mirror images for 180°…359°. */
  private rebuild(): void {
    const vx = this.vertexX
    const vy = this.vertexY
    const first = this.vertexFirstDirection
    let n = 0
    let floor = Infinity
    let top = 0
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const peak = this.peaks[k] as number
      if (peak < floor) floor = peak
      if (peak > top) top = peak
      const x = this.setterX[k] as number
      const y = this.setterY[k] as number
      if (x === 0 && y === 0) continue
      if (n > 0 && x === vx[n - 1] && y === vy[n - 1]) continue
      vx[n] = x
      vy[n] = y
      first[n] = k
      n++
    }
    // The mirror images, in the same order: the same runs, shifted by 180°.
    const half = n
    const from =
      half > 0 && -(vx[0] as number) === vx[half - 1] && -(vy[0] as number) === vy[half - 1] ? 1 : 0
    for (let i = from; i < half; i++) {
      vx[n] = -(vx[i] as number)
      vy[n] = -(vy[i] as number)
      first[n] = (first[i] as number) + ROTATION_ANGLE_COUNT
      n++
    }
    if (n > 1 && this.vertexX[0] === this.vertexX[n - 1] && this.vertexY[0] === this.vertexY[n - 1]) {
      // The last run wraps around to the first: it starts where the last vertex's run started.
      this.vertexFirstDirection[0] = this.vertexFirstDirection[n - 1] as number
      n--
    }
    this.builtPeaks.set(this.peaks)
    // A polygon thinner than this (a nearly polarised motion) is too flat for the wedge tests to
    // be trusted in floating point; every sample outside the floor circle is then scanned in full.
    this.vertices = floor > THIN_POLYGON * top ? n : 0
    if (this.edge >= n) this.edge = 0
    this.floor2 = floor * floor
    this.raisesSinceBuild = 0
  }
}

/** Blocks longer than this are seeded with their extreme samples first (see addMany). */
const SEEDED_BLOCK = 64
/** The seeds are looked for among every SEED_STRIDE-th sample: any samples serve, the extremes only tighten Q. */
const SEED_STRIDE = 4
/** The seed axes 0°, 45°, 90° and 135°, unnormalised (only the order of projections matters). */
const SEED_AXES = 4
const SEED_X = Float64Array.of(1, 1, 0, -1)
const SEED_Y = Float64Array.of(0, 1, 1, 1)
/** Smallest width of Q, relative to its largest, for the polygon tests to be used. */
const THIN_POLYGON = 1e-6
const INSIDE = -1
const UNKNOWN = -2

/**
 * Peaks max_t |h₁(t)cosθ + h₂(t)sinθ| for θ = 0°…179°, into `out` (length 180); exact
 * (see {@link DirectionalPeaks}).
 */
export function rotatedPeaks(
  h1: ArrayLike<number>,
  h2: ArrayLike<number>,
  out: Float64Array = new Float64Array(ROTATION_ANGLE_COUNT),
): Float64Array {
  if (h1.length !== h2.length) throw new RangeError('the two component histories must have the same length')
  if (out.length !== ROTATION_ANGLE_COUNT) throw new RangeError(`out must hold ${ROTATION_ANGLE_COUNT} peaks`)
  const tracker = new DirectionalPeaks()
  const xs = h1 instanceof Float64Array ? h1 : Float64Array.from(h1)
  const ys = h2 instanceof Float64Array ? h2 : Float64Array.from(h2)
  tracker.addMany(xs, ys, xs.length)
  out.set(tracker.peaks)
  return out
}

/** RotD100 and RotD50 of a set of 180 rotated peaks. `scratch` avoids an allocation per call. */
export function rotDFromPeaks(
  peaks: Float64Array,
  scratch: Float64Array = new Float64Array(ROTATION_ANGLE_COUNT),
): { rotD50: number; rotD100: number } {
  scratch.set(peaks)
  scratch.sort()
  const n = scratch.length
  const rotD100 = scratch[n - 1] as number
  const rotD50 =
    n % 2 === 0
      ? ((scratch[n / 2 - 1] as number) + (scratch[n / 2] as number)) / 2
      : (scratch[(n - 1) / 2] as number)
  return { rotD50, rotD100 }
}

/** RotD50 and RotD100 of two response histories of one oscillator. */
export function rotD(h1: ArrayLike<number>, h2: ArrayLike<number>): { rotD50: number; rotD100: number } {
  return rotDFromPeaks(rotatedPeaks(h1, h2))
}

/** Peak of |h| over the history. */
export function peakAbs(h: ArrayLike<number>): number {
  let p = 0
  for (let i = 0; i < h.length; i++) {
    const v = Math.abs(h[i] as number)
    if (v > p) p = v
  }
  return p
}

/**
 * Geometric mean of the two components' spectral ordinates, √(S₁·S₂) (the as-recorded geometric
 * mean; Boore et al. 2006, BSSA 96(4A), discuss why it depends on sensor orientation).
 */
export function geometricMeanOrdinate(s1: number, s2: number): number {
  return Math.sqrt(s1 * s2)
}

export interface PairRecord {
  /** The two horizontal components (m/s²), same Δt and length. */
  accel1MPerS2: Float64Array
  accel2MPerS2: Float64Array
  dtS: number
}

/** Peaks in the 180 directions of relative displacement, relative velocity and absolute acceleration. */
interface OscillatorDirections {
  u: DirectionalPeaks
  v: DirectionalPeaks
  a: DirectionalPeaks
}

/**
 * The kernel's coefficients of one oscillator for a pair's histories (PAIR_COEFFICIENTS values):
 * the recurrence over a sub-step of Δt/subSteps (oscillatorRecurrence.ts), then cc = 2ζω and
 * kk = ω² for the absolute acceleration A = cc·v + kk·u.
 */
export function pairCoefficients(
  method: SpectrumMethod,
  periodS: number,
  zeta: number,
  stepS: number,
  out: Float64Array = new Float64Array(PAIR_COEFFICIENTS),
): Float64Array {
  const omega = (2 * Math.PI) / periodS
  const { a11, a12, b1, c1, a21, a22, b2, c2 } = recurrenceCoefficients(method, omega, zeta, stepS)
  out[0] = a11
  out[1] = a12
  out[2] = b1
  out[3] = c1
  out[4] = a21
  out[5] = a22
  out[6] = b2
  out[7] = c2
  out[8] = 2 * zeta * omega
  out[9] = omega * omega
  return out
}

/**
 * Solves one oscillator under both components on the kernel's history mode (the same recurrence
 * and sub-steps as the single-record sweep, with the ground acceleration interpolated linearly
 * between samples), folding each block of the histories into the directional peaks, then adds
 * the closed-form peaks of the free vibration after the record in every direction
 * (freeVibration.ts).
 */
function solvePairOscillator(
  record: PairRecord,
  kernel: SweepKernel,
  periodS: number,
  zeta: number,
  subSteps: number,
  coeffs: Float64Array,
  out: OscillatorDirections,
  fold: HistoryFold,
): void {
  out.u.reset()
  out.v.reset()
  out.a.reset()
  const { u1, v1, u2, v2 } = kernel.pairHistories(
    record.accel1MPerS2,
    record.accel2MPerS2,
    subSteps,
    coeffs,
    fold,
  )
  const omega = (2 * Math.PI) / periodS
  for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
    const c = COS[k] as number
    const s = SIN[k] as number
    const tail = freeVibrationTailPeaks(c * u1 + s * u2, c * v1 + s * v2, omega, zeta)
    if (tail.u.value > (out.u.peaks[k] as number)) out.u.peaks[k] = tail.u.value
    if (tail.v.value > (out.v.peaks[k] as number)) out.v.peaks[k] = tail.v.value
    if (tail.a.value > (out.a.peaks[k] as number)) out.a.peaks[k] = tail.a.value
  }
}

/** An oscillator's peaks in the 180 directions: relative displacement u, relative velocity v, absolute acceleration a. */
export interface PairPeaks {
  u: Float64Array
  v: Float64Array
  a: Float64Array
}

/** Oscillator-steps of a pair's first pass between progress reports. */
const STEPS_PER_REPORT = 3_000_000

/**
 * Solves each oscillator under both components of the pair on `kernel`'s history mode (both
 * components at once, with the oscillator's own sub-steps) and returns its peaks in every
 * direction, in the order given.
 */
export function solvePairOscillators(
  pair: PairRecord,
  oscillators: readonly OscillatorSpec[],
  method: SpectrumMethod,
  kernel: SweepKernel,
  onProgress?: (fraction: number) => void,
): PairPeaks[] {
  const work: OscillatorDirections = {
    u: new DirectionalPeaks(),
    v: new DirectionalPeaks(),
    a: new DirectionalPeaks(),
  }
  const fold: HistoryFold = (block, count) => {
    work.u.addMany(block.u1, block.u2, count)
    work.v.addMany(block.v1, block.v2, count)
    work.a.addMany(block.a1, block.a2, count)
  }
  const coeffs = new Float64Array(PAIR_COEFFICIENTS)
  const intervals = pair.accel1MPerS2.length - 1
  let total = 0
  for (const { subSteps } of oscillators) total += intervals * subSteps
  let done = 0
  let reported = 0
  return oscillators.map(({ periodS, dampingRatio, subSteps }) => {
    pairCoefficients(method, periodS, dampingRatio, pair.dtS / subSteps, coeffs)
    solvePairOscillator(pair, kernel, periodS, dampingRatio, subSteps, coeffs, work, fold)
    done += intervals * subSteps
    if (onProgress && done - reported >= STEPS_PER_REPORT) {
      reported = done
      onProgress(done / total)
    }
    return { u: work.u.peaks.slice(), v: work.v.peaks.slice(), a: work.a.peaks.slice() }
  })
}

/** The components' own peaks: the 0° and 90° directions. */
export type PairComponent = 'first' | 'second'

/**
 * One oscillator's ordinates for a combination (the geometric mean √(S₁·S₂) of the components
 * as recorded, or RotD50 / RotD100 of the directional peaks), or one component's own.
 */
export function pairOrdinates(peaks: PairPeaks, of: Combination | PairComponent): OrdinatePeaks {
  if (of === 'first' || of === 'second') {
    const k = of === 'first' ? 0 : SECOND_COMPONENT
    return { sdM: peaks.u[k]!, svMPerS: peaks.v[k]!, saMPerS2: peaks.a[k]! }
  }
  if (of === 'geomean') {
    const mean = (p: Float64Array) => geometricMeanOrdinate(p[0]!, p[SECOND_COMPONENT]!)
    return { sdM: mean(peaks.u), svMPerS: mean(peaks.v), saMPerS2: mean(peaks.a) }
  }
  const key = of === 'rotd50' ? 'rotD50' : 'rotD100'
  return {
    sdM: rotDFromPeaks(peaks.u)[key],
    svMPerS: rotDFromPeaks(peaks.v)[key],
    saMPerS2: rotDFromPeaks(peaks.a)[key],
  }
}

export const PAIR_COMBINATION_STATEMENT =
  'Two components: each oscillator solved once per component; responses rotated as u(θ,t) = u₁(t)cosθ + u₂(t)sinθ ' +
  'for θ = 0°–179° in 1° steps. RotD100 is the largest and RotD50 the median of the 180 directional peaks ' +
  '(Boore 2010, BSSA 100(4)); the geometric mean is √(S₁·S₂) of the two components as recorded.'

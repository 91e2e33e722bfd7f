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
import {
  type HistoryFold,
  type HistoryLane,
  type HistorySkip,
  PAIR_COEFFICIENTS,
  type PairEndState,
  type SweepKernel,
} from './kernel/sweepKernel.js'
import { type SpectrumMethod, recurrenceCoefficients } from './oscillatorRecurrence.js'
import { NEIGHBOUR_PERIOD_RATIO, type OscillatorSpec, periodChains } from './sweepOscillators.js'

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
/** Direction cosines around the full circle; for j ≥ 180 the negated ones, so a projection there is exactly minus the one at j − 180. */
const TURN_COS = new Float64Array(FULL_TURN)
const TURN_SIN = new Float64Array(FULL_TURN)
for (let j = 0; j < FULL_TURN; j++) {
  const k = j % ROTATION_ANGLE_COUNT
  TURN_COS[j] = j < ROTATION_ANGLE_COUNT ? (COS[k] as number) : -(COS[k] as number)
  TURN_SIN[j] = j < ROTATION_ANGLE_COUNT ? (SIN[k] as number) : -(SIN[k] as number)
}
/**
 * A sample is skipped only if it stays below SHRINK × the peaks it is tested against. Rounding
 * moves a projection or a cross product by a few units of 1.1e-16 of the sample's length (times
 * the setter's, for a cross product); with samples within NEAR × the largest peak and the
 * smallest peak at least THIN_POLYGON × the largest, that is below 2e-9 of any peak, more than
 * 30 times inside the margin 2⁻²⁴ ≈ 6e-8, so a skipped sample provably raises no peak.
 */
const SHRINK = 1 - 2 ** -24
/** The walk over the directions a sample may raise continues while it is within this (wider) margin of the peak. */
const WALK_SHRINK = 1 - 2 ** -23
/** The polygon tests are used for samples within this many times the largest peak (larger ones are scanned in full). */
const NEAR = 4
/** Smallest peak, relative to the largest, for the polygon tests to be used (a nearly polarised motion is scanned in full). */
const THIN_POLYGON = 1e-6
/** What a visit found: the sample is not within WALK_SHRINK of the peak, is within it, or raised it. */
const NOT_NEAR = 0
const NEAR_ONLY = 1
const RAISED = 2
/** Blocks longer than this are seeded with their extreme samples first (see addMany). */
const SEEDED_BLOCK = 64
/** The seeds are looked for among every SEED_STRIDE-th sample: any samples serve, the extremes only tighten the polygon. */
const SEED_STRIDE = 8

/** The setters of a tracker's peaks (its polygon's vertices), to start another from. */
export interface DirectionalStart {
  /** Each distinct setter of the directions 0°…179° once, in direction order. */
  xs: Float64Array
  ys: Float64Array
}
/** A started tracker begins with this share of the other's setters (so of its peaks). */
const START_SHARE = 0.75

/**
 * Running peaks max_t |x(t)cosθ + y(t)sinθ| over θ = 0°…179° of a pair of histories fed one
 * sample at a time (add) or a block at a time (addMany). Exact: the peaks are those of a full
 * scan of every sample in every direction, bit for bit; most samples are skipped by tests that
 * provably cannot skip one that raises a peak.
 *
 * The samples that raise nothing are those in the polygon C = {q : |q·d_k| ≤ peak_k for all k}
 * (d_k the unit vector at k°). Around the full circle, directions j and j + 180 share a peak, and
 * the sample that set direction j (its setter, signed so its projection is positive) touches C's
 * edge line q·d_j = peak_j. Consecutive directions with the same setter form a run; the setters
 * of the runs, in direction order, go round C counter-clockwise. Between the setters s_a and s_b
 * of two neighbouring directions a and b = a + 1 (the last of one run, the first of the next), C's
 * boundary runs along the two edge lines of a and b only, because no other direction lies between
 * them. So within that wedge, a sample q is in C exactly when q·d_a ≤ peak_a and q·d_b ≤ peak_b:
 * - the floor test: |q·d| ≤ |q|, so a sample inside the circle of the smallest peak is skipped;
 * - the wedge test: a sample in the wedge of the last sample (two cross products with s_a and
 *   s_b), within SHRINK of the peaks of a and b (two projections), is skipped;
 * - otherwise the sample's wedge is found by walking from run to run; if it is still within the
 *   wedge's two peaks it is skipped, else it beats (or nearly beats) a or b. The directions a
 *   sample beats are one arc (C is convex), so the search walks outward from a or b while the
 *   sample stays within WALK_SHRINK of the peak and raises every peak it beats on the way, then
 *   makes the directions it now sets one run (and their opposites the mirror run).
 * Samples far outside (NEAR), a polygon too thin for the tests (THIN_POLYGON), a wedge of 180°
 * or more (a rounding tie) and the first samples, before every peak is positive, are scanned in
 * full. The tests always use the current peaks and setters: the runs are updated in place as
 * peaks rise (and rebuilt from the setters only after a full scan).
 */
export class DirectionalPeaks {
  /** The peak in each direction θ = k°, k = 0…179. */
  readonly peaks = new Float64Array(ROTATION_ANGLE_COUNT)
  /** The setter of each direction j = 0…359 (for j ≥ 180 the mirror image of that of j − 180). */
  private readonly setterX = new Float64Array(FULL_TURN)
  private readonly setterY = new Float64Array(FULL_TURN)
  /** The first and last direction of the run that holds direction j. */
  private readonly runStart = new Int32Array(FULL_TURN)
  private readonly runEnd = new Int32Array(FULL_TURN)
  /** Whether every peak is positive and the runs are set up. */
  private usable = false
  /** The current wedge, by the first direction b of its second run (a = b − 1). */
  private boundary = 0
  /** The current wedge's test values: s_a, s_b, then cos, sin and SHRINK × peak of a, then of b. */
  private readonly wedge = new Float64Array(10)
  /** A lower bound on the smallest peak (exact when refreshed), the direction that had it and whether that peak has risen since. */
  private floor = 0
  private floorDirection = 0
  private floorStale = false
  /** The largest peak. */
  private top = 0
  /** The peaks as startFrom left them. */
  private readonly startPeaks = new Float64Array(ROTATION_ANGLE_COUNT)

  reset(): void {
    this.peaks.fill(0)
    this.setterX.fill(0)
    this.setterY.fill(0)
    this.usable = false
    this.boundary = 0
    this.floor = 0
    this.floorDirection = 0
    this.floorStale = false
    this.top = 0
    this.loadWedge()
  }

  /** The setters of the peaks so far, for starting another tracker from them ({@link startFrom}). */
  snapshot(): DirectionalStart {
    const xs: number[] = []
    const ys: number[] = []
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const x = this.setterX[k] as number
      const y = this.setterY[k] as number
      if (k > 0 && x === this.setterX[k - 1] && y === this.setterY[k - 1]) continue
      xs.push(x)
      ys.push(y)
    }
    return { xs: Float64Array.from(xs), ys: Float64Array.from(ys) }
  }

  /**
   * Starts from START_SHARE × another tracker's setters, taken in as if they were samples (each
   * scanned in every direction, then the runs built once): the state is one this tracker reaches
   * from those points, so every test holds as for samples seen, and samples inside their polygon
   * are skipped from the first one. The peaks end the samples' own, bit for bit, wherever they
   * rise above their start ({@link heldAbove}); where one does not, the caller starts again from 0.
   */
  startFrom(start: DirectionalStart): void {
    this.reset()
    let raised = false
    for (let i = 0; i < start.xs.length; i++) {
      raised =
        this.scanAll(START_SHARE * (start.xs[i] as number), START_SHARE * (start.ys[i] as number)) || raised
    }
    if (raised) this.rebuildRuns()
    this.startPeaks.set(this.peaks)
  }

  /** Whether every peak ended strictly above where startFrom put it, so is the samples' own. */
  heldAbove(): boolean {
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      if (!((this.peaks[k] as number) > (this.startPeaks[k] as number))) return false
    }
    return true
  }

  /**
   * The squared radius of the circle inside the peaks that addMany skips at once (the floor, less
   * the rounding margin): a sample within it can raise no peak now or later, as peaks only rise.
   */
  skipBelow(): number {
    const shrunk = this.smallestPeak() * SHRINK
    return shrunk * shrunk
  }

  /** The smallest peak (the floor, refreshed where the direction that had it has risen since). */
  smallestPeak(): number {
    if (this.floorStale) this.refreshFloor()
    return this.floor
  }

  add(x: number, y: number): void {
    const floor = this.floor * SHRINK
    if (x * x + y * y > floor * floor) this.addOutsideFloor(x, y)
  }

  /**
   * Adds samples (xs[i], ys[i]) for i < count. The peaks are a maximum over a set of samples, so
   * the order does not change them: the block's extreme samples along 0°, 45°, 90° and 135° (both
   * ways; among every SEED_STRIDE-th sample) go first, so that most of the block then falls
   * inside the floor circle or its wedge and is skipped in a tight loop (the rest out of line).
   */
  addMany(xs: Float64Array, ys: Float64Array, count: number): void {
    if (count > SEEDED_BLOCK) {
      const seeds = blockExtremes(xs, ys, count)
      for (let seed = 0; seed < SEEDS; seed++) {
        const i = seeds[seed] as number
        this.add(xs[i] as number, ys[i] as number)
      }
    }
    if (this.floorStale) this.refreshFloor()
    // The tests' values in locals, reloaded after every sample handled out of line.
    const w = this.wedge
    let shrunk = this.floor * SHRINK
    let floor2 = shrunk * shrunk
    let x0 = w[0] as number
    let y0 = w[1] as number
    let x1 = w[2] as number
    let y1 = w[3] as number
    let ca = w[4] as number
    let sa = w[5] as number
    let ta = w[6] as number
    let cb = w[7] as number
    let sb = w[8] as number
    let tb = w[9] as number
    for (let i = 0; i < count; i++) {
      const x = xs[i] as number
      const y = ys[i] as number
      if (x * x + y * y <= floor2) continue
      if (x0 * y - y0 * x >= 0 && x1 * y - y1 * x <= 0 && x * ca + y * sa <= ta && x * cb + y * sb <= tb)
        continue
      this.addOutsideFloor(x, y)
      shrunk = this.floor * SHRINK
      floor2 = shrunk * shrunk
      x0 = w[0] as number
      y0 = w[1] as number
      x1 = w[2] as number
      y1 = w[3] as number
      ca = w[4] as number
      sa = w[5] as number
      ta = w[6] as number
      cb = w[7] as number
      sb = w[8] as number
      tb = w[9] as number
    }
  }

  /** A sample outside the floor circle that the current wedge's test did not skip. */
  private addOutsideFloor(x: number, y: number): void {
    const near = NEAR * this.top
    if (!this.usable || !(x * x + y * y <= near * near) || !this.locate(x, y)) {
      this.raiseEverywhere(x, y)
      return
    }
    const b = this.boundary
    const a = b === 0 ? FULL_TURN - 1 : b - 1
    const alongA = x * (TURN_COS[a] as number) + y * (TURN_SIN[a] as number)
    const alongB = x * (TURN_COS[b] as number) + y * (TURN_SIN[b] as number)
    if (alongA > (this.peaks[a % ROTATION_ANGLE_COUNT] as number) * SHRINK) this.raiseFrom(x, y, a)
    else if (alongB > (this.peaks[b % ROTATION_ANGLE_COUNT] as number) * SHRINK) this.raiseFrom(x, y, b)
  }

  /**
   * Finds the wedge that holds (x, y), walking run by run from the current one, and makes it the
   * current wedge; false if the walk fails or the wedge is 180° or wider.
   */
  private locate(x: number, y: number): boolean {
    const sx = this.setterX
    const sy = this.setterY
    let b = this.boundary
    for (let steps = 0; steps < FULL_TURN; steps++) {
      const a = b === 0 ? FULL_TURN - 1 : b - 1
      if ((sx[a] as number) * y - (sy[a] as number) * x < 0) {
        b = this.runStart[a] as number
        continue
      }
      if ((sx[b] as number) * y - (sy[b] as number) * x > 0) {
        const end = this.runEnd[b] as number
        b = end + 1 === FULL_TURN ? 0 : end + 1
        continue
      }
      if (!((sx[a] as number) * (sy[b] as number) - (sy[a] as number) * (sx[b] as number) > 0)) return false
      if (b !== this.boundary) {
        this.boundary = b
        this.loadWedge()
      }
      return true
    }
    return false
  }

  /** The current wedge's test values; ones no sample passes while the polygon is not usable. */
  private loadWedge(): void {
    const w = this.wedge
    if (!this.usable || !(this.floor > THIN_POLYGON * this.top)) {
      w.fill(0)
      w[6] = -Infinity
      w[9] = -Infinity
      return
    }
    const b = this.boundary
    const a = b === 0 ? FULL_TURN - 1 : b - 1
    w[0] = this.setterX[a] as number
    w[1] = this.setterY[a] as number
    w[2] = this.setterX[b] as number
    w[3] = this.setterY[b] as number
    w[4] = TURN_COS[a] as number
    w[5] = TURN_SIN[a] as number
    w[6] = (this.peaks[a % ROTATION_ANGLE_COUNT] as number) * SHRINK
    w[7] = TURN_COS[b] as number
    w[8] = TURN_SIN[b] as number
    w[9] = (this.peaks[b % ROTATION_ANGLE_COUNT] as number) * SHRINK
  }

  /** Raises direction j (0…359) if (x, y) beats its peak; says whether it did, or came within WALK_SHRINK of it. */
  private visit(x: number, y: number, j: number): number {
    const along = x * (TURN_COS[j] as number) + y * (TURN_SIN[j] as number)
    const k = j < ROTATION_ANGLE_COUNT ? j : j - ROTATION_ANGLE_COUNT
    const peak = this.peaks[k] as number
    if (along > peak) {
      this.peaks[k] = along
      if (along > this.top) this.top = along
      if (k === this.floorDirection) this.floorStale = true
      const opposite = j < ROTATION_ANGLE_COUNT ? j + ROTATION_ANGLE_COUNT : k
      this.setterX[j] = x
      this.setterY[j] = y
      this.setterX[opposite] = -x
      this.setterY[opposite] = -y
      return RAISED
    }
    return along > peak * WALK_SHRINK ? NEAR_ONLY : NOT_NEAR
  }

  /**
   * Walks outward from direction `start` (one the sample comes within SHRINK of) while the sample
   * stays within WALK_SHRINK of the peak, raising the peaks it beats, then makes each stretch of
   * directions it now sets a run. The wider walking margin keeps rounding from ending the walk
   * before the arc of directions the sample beats.
   */
  private raiseFrom(x: number, y: number, start: number): void {
    let raised = false
    let last = start
    for (let count = 0; count < ROTATION_ANGLE_COUNT; count++) {
      const found = this.visit(x, y, last)
      if (found === NOT_NEAR) break
      if (found === RAISED) raised = true
      last = last + 1 === FULL_TURN ? 0 : last + 1
    }
    let first = start
    for (let count = 0; count < ROTATION_ANGLE_COUNT; count++) {
      const j = first === 0 ? FULL_TURN - 1 : first - 1
      const found = this.visit(x, y, j)
      if (found === NOT_NEAR) break
      if (found === RAISED) raised = true
      first = j
    }
    if (!raised) return
    // Directions first … last − 1 were visited: the stretches among them that (x, y) now sets.
    let from = -1
    for (let j = first; j !== last; j = j + 1 === FULL_TURN ? 0 : j + 1) {
      const mine = this.setterX[j] === x && this.setterY[j] === y
      if (mine && from < 0) from = j
      if (!mine && from >= 0) {
        this.makeRun(from, j === 0 ? FULL_TURN - 1 : j - 1)
        from = -1
      }
    }
    if (from >= 0) this.makeRun(from, last === 0 ? FULL_TURN - 1 : last - 1)
    this.loadWedge()
  }

  /** Makes directions from … to (cyclic) one run, and their opposites another; the current wedge starts at `from`. */
  private makeRun(from: number, to: number): void {
    this.splitRuns(from, to)
    this.splitRuns((from + ROTATION_ANGLE_COUNT) % FULL_TURN, (to + ROTATION_ANGLE_COUNT) % FULL_TURN)
    this.boundary = from
  }

  /** Makes directions from … to one run: the run before it now ends at from − 1, the one after starts at to + 1. */
  private splitRuns(from: number, to: number): void {
    const start = this.runStart
    const end = this.runEnd
    const before = from === 0 ? FULL_TURN - 1 : from - 1
    const after = to + 1 === FULL_TURN ? 0 : to + 1
    if (end[before] !== before) {
      for (let j = start[before] as number; ; j = j + 1 === FULL_TURN ? 0 : j + 1) {
        end[j] = before
        if (j === before) break
      }
    }
    if (start[after] !== after) {
      const last = end[after] as number
      for (let j = after; ; j = j + 1 === FULL_TURN ? 0 : j + 1) {
        start[j] = after
        if (j === last) break
      }
    }
    for (let j = from; ; j = j + 1 === FULL_TURN ? 0 : j + 1) {
      start[j] = from
      end[j] = to
      if (j === to) break
    }
  }

  /** The definition: (x, y) against every direction; then the runs afresh. */
  private raiseEverywhere(x: number, y: number): void {
    if (this.scanAll(x, y)) this.rebuildRuns()
  }

  /** (x, y) against every direction, raising each peak it beats; whether it raised any. */
  private scanAll(x: number, y: number): boolean {
    let raised = false
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const projection = x * (COS[k] as number) + y * (SIN[k] as number)
      if (Math.abs(projection) > (this.peaks[k] as number)) {
        this.peaks[k] = Math.abs(projection)
        const sx = projection >= 0 ? x : -x
        const sy = projection >= 0 ? y : -y
        this.setterX[k] = sx
        this.setterY[k] = sy
        this.setterX[k + ROTATION_ANGLE_COUNT] = -sx
        this.setterY[k + ROTATION_ANGLE_COUNT] = -sy
        raised = true
      }
    }
    return raised
  }

  private refreshFloor(): void {
    let floor = Infinity
    let at = 0
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const peak = this.peaks[k] as number
      if (peak < floor) {
        floor = peak
        at = k
      }
    }
    this.floor = floor
    this.floorDirection = at
    this.floorStale = false
  }

  /** The runs from the setters: a new run wherever the setter changes. */
  private rebuildRuns(): void {
    this.refreshFloor()
    let top = 0
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) top = Math.max(top, this.peaks[k] as number)
    this.top = top
    const sx = this.setterX
    const sy = this.setterY
    let from = -1
    for (let j = 0; j < FULL_TURN && from < 0; j++) if (!sameSetter(sx, sy, j)) from = j
    this.usable = this.floor > 0 && from >= 0
    if (this.usable) {
      let runFrom = from
      for (let step = 0; step < FULL_TURN; step++) {
        const j = (from + step) % FULL_TURN
        if (step > 0 && !sameSetter(sx, sy, j)) runFrom = j
        this.runStart[j] = runFrom
      }
      let runTo = from === 0 ? FULL_TURN - 1 : from - 1
      for (let step = 0; step < FULL_TURN; step++) {
        const j = (from + FULL_TURN - 1 - step) % FULL_TURN
        if (step > 0 && !sameSetter(sx, sy, j + 1 === FULL_TURN ? 0 : j + 1)) runTo = j
        this.runEnd[j] = runTo
      }
      this.boundary = from
    }
    this.loadWedge()
  }
}

/** Whether direction j has the same setter as direction j − 1. */
function sameSetter(sx: Float64Array, sy: Float64Array, j: number): boolean {
  const i = j === 0 ? FULL_TURN - 1 : j - 1
  return sx[i] === sx[j] && sy[i] === sy[j]
}

/** Seeds per block: the largest and smallest x, y, x + y and y − x. */
const SEEDS = 8
const seedIndex = new Int32Array(SEEDS)

/**
 * The indices of a block's extreme samples along 0°, 90°, 45° and 135°, both ways (x, y, x + y
 * and y − x, unnormalised: only the order matters), among every SEED_STRIDE-th sample. Shared
 * scratch, read before the next call. Unrolled into locals on purpose: a loop over the axes with
 * the extremes in an array cost about 1 ns more per sample of the whole search.
 */
function blockExtremes(xs: Float64Array, ys: Float64Array, count: number): Int32Array {
  let xMax = -Infinity
  let xMin = Infinity
  let yMax = -Infinity
  let yMin = Infinity
  let sMax = -Infinity
  let sMin = Infinity
  let dMax = -Infinity
  let dMin = Infinity
  const at = seedIndex.fill(0)
  for (let i = 0; i < count; i += SEED_STRIDE) {
    const x = xs[i] as number
    const y = ys[i] as number
    const s = x + y
    const d = y - x
    if (x > xMax) {
      xMax = x
      at[0] = i
    }
    if (x < xMin) {
      xMin = x
      at[1] = i
    }
    if (y > yMax) {
      yMax = y
      at[2] = i
    }
    if (y < yMin) {
      yMin = y
      at[3] = i
    }
    if (s > sMax) {
      sMax = s
      at[4] = i
    }
    if (s < sMin) {
      sMin = s
      at[5] = i
    }
    if (d > dMax) {
      dMax = d
      at[6] = i
    }
    if (d < dMin) {
      dMin = d
      at[7] = i
    }
  }
  return at
}

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

/**
 * RotD100 and RotD50 of a set of 180 rotated peaks. `scratch` avoids an allocation per call. The
 * middle values are found by selection, not a full sort: the same values, so the same bits.
 */
export function rotDFromPeaks(
  peaks: Float64Array,
  scratch: Float64Array = new Float64Array(ROTATION_ANGLE_COUNT),
): { rotD50: number; rotD100: number } {
  scratch.set(peaks)
  const n = scratch.length
  let rotD100 = -Infinity
  for (let i = 0; i < n; i++) rotD100 = Math.max(rotD100, scratch[i] as number)
  if (n % 2 === 1) return { rotD50: selectSmallest(scratch, (n - 1) / 2), rotD100 }
  // The lower middle value; every value after it is at least as large, so the upper one is their minimum.
  const lower = selectSmallest(scratch, n / 2 - 1)
  let upper = Infinity
  for (let i = n / 2; i < n; i++) upper = Math.min(upper, scratch[i] as number)
  return { rotD50: (lower + upper) / 2, rotD100 }
}

/**
 * The k-th smallest of `values` (from 0), which it reorders so that no value before index k is
 * larger and none after it smaller (Hoare's selection with a middle pivot). For peaks: no NaN.
 */
function selectSmallest(values: Float64Array, k: number): number {
  let lo = 0
  let hi = values.length - 1
  while (lo < hi) {
    const pivot = values[(lo + hi) >>> 1] as number
    let i = lo
    let j = hi
    while (i <= j) {
      while ((values[i] as number) < pivot) i++
      while ((values[j] as number) > pivot) j--
      if (i <= j) {
        const swap = values[i] as number
        values[i] = values[j] as number
        values[j] = swap
        i++
        j--
      }
    }
    if (k <= j) hi = j
    else if (k >= i) lo = i
    else break
  }
  return values[k] as number
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

/** Where an oscillator's directional peaks start: START_SHARE × another oscillator's setters, for u, v and A. */
export interface PairStart {
  u: DirectionalStart
  v: DirectionalStart
  a: DirectionalStart
}

/**
 * Whether the free vibration after the record provably raises no directional peak, so its
 * closed-form peaks need not be found in each direction. In direction θ it is
 * e^(−σt)(P·cos ω_D t + Q·sin ω_D t) (freeVibrationTailPeaks), never above √(P² + Q²); P and Q
 * are linear in the end state projected on θ, so bounded through the end state's resultant
 * lengths |u| and |v|. With a margin far above rounding, below the smallest peak of each of u,
 * v and A means below every one.
 */
function tailBelowPeaks(
  end: PairEndState,
  omega: number,
  zeta: number,
  peaks: OscillatorDirections,
): boolean {
  const u = Math.hypot(end.u1, end.u2)
  const v = Math.hypot(end.v1, end.v2)
  const sigma = zeta * omega
  const omegaD = omega * Math.sqrt(1 - zeta * zeta)
  const k = omega * omega
  const uQ = (v + sigma * u) / omegaD
  const vQ = (k * u + sigma * v) / omegaD
  const margin = 1 + 1e-9
  return (
    margin * Math.hypot(u, uQ) < peaks.u.smallestPeak() &&
    margin * Math.hypot(v, vQ) < peaks.v.smallestPeak() &&
    margin * Math.hypot(2 * sigma * v + k * u, 2 * sigma * vQ + k * uQ) < peaks.a.smallestPeak()
  )
}

/**
 * One oscillator's directional search as the kernel feeds it: the trackers of u, v and A, the
 * coefficients, and the squared radii inside which the kernel leaves samples out (each tracker's
 * floor circle, as addMany would skip them first), refreshed after every block.
 */
class SearchLane implements HistoryLane {
  readonly out: OscillatorDirections = {
    u: new DirectionalPeaks(),
    v: new DirectionalPeaks(),
    a: new DirectionalPeaks(),
  }
  readonly coeffs = new Float64Array(PAIR_COEFFICIENTS)
  readonly skip: HistorySkip = new Float64Array(3)
  readonly fold: HistoryFold = (block) => {
    this.out.u.addMany(block.u1, block.u2, block.kept[0]!)
    this.out.v.addMany(block.v1, block.v2, block.kept[1]!)
    this.out.a.addMany(block.a1, block.a2, block.kept[2]!)
    this.refreshSkip()
  }

  /** Readies the trackers for a new oscillator: from a start, or from 0. */
  begin(start: PairStart | undefined): void {
    const { u, v, a } = this.out
    if (start) {
      u.startFrom(start.u)
      v.startFrom(start.v)
      a.startFrom(start.a)
    } else {
      u.reset()
      v.reset()
      a.reset()
    }
    this.refreshSkip()
  }

  /** Whether every peak ended above its start, so is the samples' own (see DirectionalPeaks.startFrom). */
  held(): boolean {
    return this.out.u.heldAbove() && this.out.v.heldAbove() && this.out.a.heldAbove()
  }

  /**
   * The histories' peaks, with the closed-form peaks of the free vibration after the record in
   * every direction (freeVibration.ts) added, and the setters of the histories' own peaks.
   */
  finish(end: PairEndState, periodS: number, zeta: number): PairPeaks {
    const { u, v, a } = this.out
    const setters = { u: u.snapshot(), v: v.snapshot(), a: a.snapshot() }
    const omega = (2 * Math.PI) / periodS
    if (tailBelowPeaks(end, omega, zeta, this.out)) return this.copy(setters)
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const c = COS[k] as number
      const s = SIN[k] as number
      const tail = freeVibrationTailPeaks(c * end.u1 + s * end.u2, c * end.v1 + s * end.v2, omega, zeta)
      if (tail.u.value > (u.peaks[k] as number)) u.peaks[k] = tail.u.value
      if (tail.v.value > (v.peaks[k] as number)) v.peaks[k] = tail.v.value
      if (tail.a.value > (a.peaks[k] as number)) a.peaks[k] = tail.a.value
    }
    return this.copy(setters)
  }

  private copy(setters: PairStart): PairPeaks {
    const { u, v, a } = this.out
    return { u: u.peaks.slice(), v: v.peaks.slice(), a: a.peaks.slice(), setters }
  }

  private refreshSkip(): void {
    this.skip[0] = this.out.u.skipBelow()
    this.skip[1] = this.out.v.skipBelow()
    this.skip[2] = this.out.a.skipBelow()
  }
}

/** An oscillator's peaks in the 180 directions: relative displacement u, relative velocity v, absolute acceleration a. */
export interface PairPeaks {
  u: Float64Array
  v: Float64Array
  a: Float64Array
  /** The setters of the histories' own peaks (before the free vibration), for a later pass to start from. */
  setters?: PairStart
}

/** Oscillator-steps of a pair's first pass between progress reports. */
const STEPS_PER_REPORT = 3_000_000

/**
 * Solves each oscillator under both components of the pair on `kernel`'s history mode (both
 * components at once, with the oscillator's own sub-steps, the same recurrence as the
 * single-record sweep and the ground acceleration interpolated linearly between samples) and
 * returns its peaks in every direction, in the order given. They are solved in period order
 * within each damping ratio (the largest damping first), two at a time where neighbours share
 * their sub-steps (the kernel then advances both side by side), and each starts at three
 * quarters of the directional peaks of the last one solved before it (for the first of a damping
 * ratio, the first of the one before), where that one's period lies within NEIGHBOUR_PERIOD_RATIO
 * of its own. Where a peak does not end above its start, the oscillator is run again from 0, so
 * the peaks are the same bits as from 0 in any case; `onSolvedAgain` gets the oscillator-steps
 * of each such run. `startsGiven` (by the oscillators' order) replaces those starts where set:
 * a later pass of the same oscillators starts from the setters of the last (PairPeaks.setters).
 */
export function solvePairOscillators(
  pair: PairRecord,
  oscillators: readonly OscillatorSpec[],
  method: SpectrumMethod,
  kernel: SweepKernel,
  onProgress?: (fraction: number) => void,
  onSolvedAgain?: (oscillatorSteps: number) => void,
  startsGiven?: readonly (PairStart | undefined)[],
): PairPeaks[] {
  const { accel1MPerS2: first, accel2MPerS2: second, dtS } = pair
  const lanes = [new SearchLane(), new SearchLane()] as const
  const intervals = first.length - 1
  let total = 0
  for (const { subSteps } of oscillators) total += intervals * subSteps
  let done = 0
  let reported = 0
  const results: PairPeaks[] = new Array<PairPeaks>(oscillators.length)
  /** Solves the oscillators at `indices` (one, or two with the same sub-steps) from their starts. */
  const solve = (indices: readonly number[], starts: readonly (PairStart | undefined)[]) => {
    const { subSteps } = oscillators[indices[0]!]!
    indices.forEach((index, l) => {
      const { periodS, dampingRatio } = oscillators[index]!
      pairCoefficients(method, periodS, dampingRatio, dtS / subSteps, lanes[l]!.coeffs)
      lanes[l]!.begin(starts[l])
    })
    const ends =
      indices.length === 2
        ? kernel.pairHistoriesTwo(first, second, subSteps, lanes[0], lanes[1])
        : [kernel.pairHistories(first, second, subSteps, lanes[0].coeffs, lanes[0].fold, lanes[0].skip)]
    indices.forEach((index, l) => {
      const lane = lanes[l]!
      let end = ends[l]!
      if (starts[l] && !lane.held()) {
        onSolvedAgain?.(2 * intervals * subSteps)
        lane.begin(undefined)
        end = kernel.pairHistories(first, second, subSteps, lane.coeffs, lane.fold, lane.skip)
      }
      const { periodS, dampingRatio } = oscillators[index]!
      results[index] = lane.finish(end, periodS, dampingRatio)
      done += intervals * subSteps
    })
    if (onProgress && done - reported >= STEPS_PER_REPORT) {
      reported = done
      onProgress(done / total)
    }
    return results[indices.at(-1)!]!.setters
  }
  // The most damped first: each chain's first oscillator then starts from the one before at the
  // same or a near period, whose response is the smaller for its larger damping.
  const chains = periodChains(oscillators).sort(
    (a, b) => oscillators[b[0]!]!.dampingRatio - oscillators[a[0]!]!.dampingRatio,
  )
  let head: number | undefined
  for (const chain of chains) {
    let previous = head === undefined ? undefined : results[head]!.setters
    let previousPeriodS = head === undefined ? 0 : oscillators[head]!.periodS
    head = chain[0]
    for (let at = 0; at < chain.length;) {
      const next = chain[at + 1]
      const together = next !== undefined && oscillators[next]!.subSteps === oscillators[chain[at]!]!.subSteps
      const indices = together ? [chain[at]!, next] : [chain[at]!]
      const starts = indices.map((index) => {
        const given = startsGiven?.[index]
        if (given) return given
        const periodS = oscillators[index]!.periodS
        const near = Math.max(periodS, previousPeriodS) / Math.min(periodS, previousPeriodS)
        return previous && near <= NEIGHBOUR_PERIOD_RATIO ? previous : undefined
      })
      at += indices.length
      previous = solve(indices, starts)
      previousPeriodS = oscillators[indices.at(-1)!]!.periodS
    }
  }
  return results
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
  let known = rotDOf.get(peaks)
  if (!known) {
    known = { u: rotDFromPeaks(peaks.u), v: rotDFromPeaks(peaks.v), a: rotDFromPeaks(peaks.a) }
    rotDOf.set(peaks, known)
  }
  return { sdM: known.u[key], svMPerS: known.v[key], saMPerS2: known.a[key] }
}

/**
 * RotD50 and RotD100 of an oscillator's peaks, found once: the refinement asks for them after
 * every pass, and the curves again. A solve makes new PairPeaks; nothing changes one after.
 */
const rotDOf = new WeakMap<PairPeaks, Record<'u' | 'v' | 'a', { rotD50: number; rotD100: number }>>()

export const PAIR_COMBINATION_STATEMENT =
  'Two components: each oscillator solved once per component; responses rotated as u(θ,t) = u₁(t)cosθ + u₂(t)sinθ ' +
  'for θ = 0°–179° in 1° steps. RotD100 is the largest and RotD50 the median of the 180 directional peaks ' +
  '(Boore 2010, BSSA 100(4)); the geometric mean is √(S₁·S₂) of the two components as recorded.'

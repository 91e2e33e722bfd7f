/**
 * The oscillator-sweep kernel: advances many single-degree-of-freedom
 * oscillators through one record with the same sub-step count, keeps the
 * peaks of |u|, |v| and |A| (absolute acceleration) at step ends with the
 * steps they occur at, and lists the steps whose interior may hold a larger
 * value (candidates, resolved in closed form or from interpolants by
 * betweenSteps.ts).
 *
 * Two implementations give the same bits, NaN included: a WebAssembly SIMD kernel compiled
 * from sweepKernel.as (two oscillators per pass as one f64x2 vector) and a plain JavaScript kernel, the reference and the fallback
 * where WebAssembly SIMD is unavailable. Both evaluate, per oscillator and
 * sub-step, in this order:
 *   u' = ((a11·u + a12·v) + b1·f) + c1·f'
 *   v' = ((a21·u + a22·v) + b2·f) + c2·f'
 *   |A| = |cc·v' + kk·u'|
 * with f, f' the ground acceleration interpolated linearly between samples:
 * f_j = f_start + ((f_end − f_start)/m)·j for 0 < j < m, and f_m = f_end.
 *
 * Candidate steps. Within a step the exact response to the linear forcing is a
 * straight line plus a damped sinusoid of amplitude W, whose n-th derivative
 * is bounded by ωⁿW (betweenSteps.ts). A step is a candidate unless, for each
 * of X = u, v, A, the bound on X inside the step,
 *   min(max(|X₀|, |X₁|) + q·W_X, lin_X + W_X),  W_u = W, W_v = ωW, W_A = ω²W,
 * stays at or below the running peak of |X| (q = 1.01·(ωh)²/8). The kernel
 * first applies the same test with W replaced by the cheap upper bound
 *   Ŵ = (max|u| + up) + ((max|v| + vp) + σ·(max|u| + up))/ω_D
 * (up, vp bound the particular solution over the record), without the lin_X
 * branch, and evaluates W exactly only where that fails.
 *
 * Layout, structure of arrays, `count` oscillators:
 * - coeffs (21·count): a11, a12, b1, c1, a21, a22, b2, c2, cc, kk, ω, q, σ, 1/ω_D, 1/k, c/k², up, vp,
 *   then the values max|u|, max|v| and max|A| start from: 0, or lower bounds on the peaks, which
 *   only thin out the listed steps; the caller checks that each peak ends above its start and
 *   sweeps again from 0 where one does not (sweepOscillators.ts);
 * - out (7·count): max|u|, max|v|, max|A|, step of max|u|, step of max|A|, u at end, v at end;
 * - candidates (4 per entry): oscillator index, step, u and v at the step's start.
 *
 * History mode (pairs): one oscillator under both components of a pair, the same recurrence and
 * order of operations, writing u, v and A = cc·v + kk·u (signed) of both components at every
 * sub-step end, a block of HISTORY_BLOCK sub-steps at a time, for the directional peak search
 * (rotd.ts). The WebAssembly kernel advances the two components as the two lanes of one vector.
 * Each quantity's samples within a radius the caller gives (the circle inside its directional
 * peaks) are left out of the block, so the search sees only those that might raise a peak.
 */
import { SWEEP_KERNEL_WASM_BASE64 } from './sweepKernelWasm.generated.js'

export type KernelName = 'wasm-simd' | 'js'

export const COEFFICIENT_ARRAYS = 21
export const OUTPUT_ARRAYS = 7
/** Values per candidate entry. */
export const CANDIDATE_VALUES = 4

/** Values of a pair oscillator's coefficients: a11, a12, b1, c1, a21, a22, b2, c2, cc, kk. */
export const PAIR_COEFFICIENTS = 10
/** Sub-steps of response history per block (at least MAX_SUB_STEPS of subSteps.ts, so one interval always fits). */
export const HISTORY_BLOCK = 4096
/** Keeps every sample of a history (no squared radius is below −1). */
const KEEP_ALL: HistorySkip = Float64Array.of(-1, -1, -1)
/**
 * Bytes of the history mode's coefficients, state, skip and kept, for two oscillators, before its
 * arrays: 2 × PAIR_COEFFICIENTS f64, 2 × 4 f64, 2 × 4 f64 and 2 × 4 i32 (a multiple of 16).
 */
const PAIR_HEADER_BYTES = (2 * PAIR_COEFFICIENTS + 8 + 8) * 8 + 8 * 4

/**
 * One block of a pair oscillator's response histories: u, v and A of the first and second
 * components, each kept sample in time order; `kept` says how many of each (u, v, A).
 */
export interface HistoryBlock {
  u1: Float64Array
  u2: Float64Array
  v1: Float64Array
  v2: Float64Array
  a1: Float64Array
  a2: Float64Array
  kept: Int32Array
}

/**
 * For u, v and A, a squared radius: a sample (x₁, x₂) with x₁² + x₂² ≤ it is left out of that
 * quantity's block (−1 keeps every sample). The caller may change it between blocks.
 */
export type HistorySkip = Float64Array

/** The end of a pair oscillator's histories: the state of each component at the last sample. */
export interface PairEndState {
  u1: number
  v1: number
  u2: number
  v2: number
}

/** Receives each block of histories with the number of sub-steps it covers; the block is reused after the call. */
export type HistoryFold = (block: HistoryBlock, count: number) => void

/** One sweep of `count` oscillators over the loaded record (SweepKernel.sweep; layout above). */
export type SweepCall = (
  count: number,
  subSteps: number,
  stepS: number,
  coeffs: Float64Array,
  out: Float64Array,
  candidates: CandidateBuffer,
) => number

/** Where the kernel lists candidate steps: room for `capacity` entries of CANDIDATE_VALUES values. */
export interface CandidateBuffer {
  values: Float64Array
  capacity: number
}

export interface SweepKernel {
  readonly name: KernelName
  /** Oscillators per call must be a multiple of this. */
  readonly lanes: number
  /** Oscillators advanced together per pass: calls are most efficient in multiples of this. */
  readonly width: number
  /** Makes (a copy of) `record` the ground acceleration for the following sweeps. */
  loadRecord(record: Float64Array): void
  /** The array last loaded, so a caller can tell whether a nested sweep replaced it. */
  readonly loadedRecord: Float64Array | null
  /**
   * Runs the sweep; returns how many candidate steps were found, all listed in `candidates`:
   * where they do not fit, the kernel replaces its `values` with a larger array (and raises
   * `capacity`), so a sweep never has to run again for want of room.
   */
  sweep: SweepCall
  /**
   * History mode: one oscillator (coefficients `coeffs`, PAIR_COEFFICIENTS values) from rest under
   * the components `first` and `second` (same length) with `subSteps` sub-steps per interval;
   * hands each block of histories to `fold` in time order and returns the end state. With `skip`
   * (3 values, read before each block), samples inside its radii are left out of the blocks. May
   * replace the loaded record (loadedRecord then becomes null).
   */
  pairHistories(
    first: Float64Array,
    second: Float64Array,
    subSteps: number,
    coeffs: Float64Array,
    fold: HistoryFold,
    skip?: HistorySkip,
  ): PairEndState
  /**
   * pairHistories for two oscillators with the same sub-steps at once (each with its own
   * coefficients, fold and skip; the same bits as one at a time): the WebAssembly kernel advances
   * them side by side, which runs faster than one after the other.
   */
  pairHistoriesTwo(
    first: Float64Array,
    second: Float64Array,
    subSteps: number,
    one: HistoryLane,
    other: HistoryLane,
  ): [PairEndState, PairEndState]
}

/** One oscillator's part of a pairHistoriesTwo call. */
export interface HistoryLane {
  coeffs: Float64Array
  fold: HistoryFold
  skip?: HistorySkip
}

/**
 * The exact test of one step (the second stage above), with the forcing f0 → f1 over the step,
 * the start state (u0, v0), the larger end values eu, ev, ea and the running peaks. The
 * WebAssembly kernel repeats these operations in this order.
 */
export function preciseCandidate(
  u0: number,
  v0: number,
  f0: number,
  f1: number,
  invH: number,
  eu: number,
  ev: number,
  ea: number,
  maxU: number,
  maxV: number,
  maxA: number,
  om: number,
  q: number,
  sg: number,
  iwd: number,
  ik: number,
  ck: number,
  kk: number,
): boolean {
  const s = (f1 - f0) * invH
  const p = u0 + f0 * ik - s * ck
  const r = (v0 + s * ik + sg * p) * iwd
  const w = Math.sqrt(p * p + r * r)
  const as = Math.abs(s)
  const fm = Math.max(Math.abs(f0), Math.abs(f1))
  const wv = om * w
  const wa = kk * w
  return (
    Math.min(eu + q * w, fm * ik + as * ck + w) > maxU ||
    Math.min(ev + q * wv, as * ik + wv) > maxV ||
    Math.min(ea + q * wa, fm + wa) > maxA
  )
}

/** Gives `candidates` room for `capacity` entries, keeping the first `kept`; returns the new array. */
function enlarged(candidates: CandidateBuffer, kept: number, capacity: number): Float64Array {
  const values = new Float64Array(CANDIDATE_VALUES * capacity)
  values.set(candidates.values.subarray(0, CANDIDATE_VALUES * kept))
  candidates.values = values
  candidates.capacity = capacity
  return values
}

/** The JavaScript kernel, one oscillator at a time with its state in locals. */
export function jsSweep(
  record: Float64Array,
  ...[count, subSteps, stepS, coeffs, out, candidates]: Parameters<SweepCall>
): number {
  const samples = record.length
  const m = subSteps
  const invH = 1 / stepS
  let list = candidates.values
  let capacity = Math.min(candidates.capacity, Math.floor(list.length / CANDIDATE_VALUES))
  let found = 0
  for (let o = 0; o < count; o++) {
    const a11 = coeffs[o]!
    const a12 = coeffs[count + o]!
    const b1 = coeffs[2 * count + o]!
    const c1 = coeffs[3 * count + o]!
    const a21 = coeffs[4 * count + o]!
    const a22 = coeffs[5 * count + o]!
    const b2 = coeffs[6 * count + o]!
    const c2 = coeffs[7 * count + o]!
    const cc = coeffs[8 * count + o]!
    const kk = coeffs[9 * count + o]!
    const om = coeffs[10 * count + o]!
    const q = coeffs[11 * count + o]!
    const sg = coeffs[12 * count + o]!
    const iwd = coeffs[13 * count + o]!
    const ik = coeffs[14 * count + o]!
    const ck = coeffs[15 * count + o]!
    const up = coeffs[16 * count + o]!
    const vp = coeffs[17 * count + o]!
    let u = 0
    let v = 0
    let maxU = coeffs[18 * count + o]!
    let maxV = coeffs[19 * count + o]!
    let maxA = coeffs[20 * count + o]!
    let stepU = 0
    let stepA = 0
    let pu = 0
    let pv = 0
    let pa = 0
    let step = 0
    let start = record[0]!
    for (let i = 1; i < samples; i++) {
      const end = record[i]!
      const slope = (end - start) / m
      let f = start
      for (let j = 1; j <= m; j++) {
        const fNext = j === m ? end : start + slope * j
        step += 1
        const u0 = u
        const v0 = v
        const nu = a11 * u + a12 * v + b1 * f + c1 * fNext
        const nv = a21 * u + a22 * v + b2 * f + c2 * fNext
        u = nu
        v = nv
        const au = Math.abs(u)
        if (au > maxU) {
          maxU = au
          stepU = step
        }
        const av = Math.abs(v)
        if (av > maxV) maxV = av
        const aa = Math.abs(cc * v + kk * u)
        if (aa > maxA) {
          maxA = aa
          stepA = step
        }
        // As `max` above (and f64x2.pmax in WebAssembly): Math.max would differ only on NaN.
        const eu = au > pu ? au : pu
        const ev = av > pv ? av : pv
        const ea = aa > pa ? aa : pa
        const wu = maxU + up
        const w = wu + (maxV + vp + sg * wu) * iwd
        const mu = q * w
        if (eu + mu > maxU || ev + om * mu > maxV || ea + kk * mu > maxA) {
          if (
            preciseCandidate(u0, v0, f, fNext, invH, eu, ev, ea, maxU, maxV, maxA, om, q, sg, iwd, ik, ck, kk)
          ) {
            if (found === capacity) {
              capacity = Math.max(1024, 2 * capacity)
              list = enlarged(candidates, found, capacity)
            }
            const at = CANDIDATE_VALUES * found
            list[at] = o
            list[at + 1] = step
            list[at + 2] = u0
            list[at + 3] = v0
            found++
          }
        }
        pu = au
        pv = av
        pa = aa
        f = fNext
      }
      start = end
    }
    out[o] = maxU
    out[count + o] = maxV
    out[2 * count + o] = maxA
    out[3 * count + o] = stepU
    out[4 * count + o] = stepA
    out[5 * count + o] = u
    out[6 * count + o] = v
  }
  return found
}

/** Throws unless a pair's histories can be run: components of one length, sub-steps that fit a block. */
function checkPairHistories(first: Float64Array, second: Float64Array, subSteps: number): void {
  if (first.length !== second.length) throw new RangeError('the two components must have the same length')
  if (!Number.isInteger(subSteps) || subSteps < 1 || subSteps > HISTORY_BLOCK)
    throw new RangeError(`subSteps must be an integer in [1, ${HISTORY_BLOCK}]`)
}

/** Zeroed buffers for one block of histories. */
export function historyBlock(): HistoryBlock {
  const make = () => new Float64Array(HISTORY_BLOCK)
  return { u1: make(), u2: make(), v1: make(), v2: make(), a1: make(), a2: make(), kept: new Int32Array(3) }
}

/** The JavaScript history mode, both components in locals: the reference for the WebAssembly one. */
export function jsPairHistories(
  first: Float64Array,
  second: Float64Array,
  subSteps: number,
  coeffs: Float64Array,
  block: HistoryBlock,
  fold: HistoryFold,
  skip: HistorySkip = KEEP_ALL,
): PairEndState {
  checkPairHistories(first, second, subSteps)
  const a11 = coeffs[0]!
  const a12 = coeffs[1]!
  const b1 = coeffs[2]!
  const c1 = coeffs[3]!
  const a21 = coeffs[4]!
  const a22 = coeffs[5]!
  const b2 = coeffs[6]!
  const c2 = coeffs[7]!
  const cc = coeffs[8]!
  const kk = coeffs[9]!
  const m = subSteps
  const { u1: hu1, u2: hu2, v1: hv1, v2: hv2, a1: ha1, a2: ha2 } = block
  let u1 = 0
  let v1 = 0
  let u2 = 0
  let v2 = 0
  let start1 = first[0]!
  let start2 = second[0]!
  let i = 1
  while (i < first.length) {
    let n = 0
    let nu = 0
    let nv = 0
    let na = 0
    const skipU = skip[0]!
    const skipV = skip[1]!
    const skipA = skip[2]!
    for (; i < first.length && n + m <= HISTORY_BLOCK; i++) {
      const end1 = first[i]!
      const end2 = second[i]!
      const slope1 = (end1 - start1) / m
      const slope2 = (end2 - start2) / m
      let f1 = start1
      let f2 = start2
      for (let j = 1; j <= m; j++) {
        const next1 = j === m ? end1 : start1 + slope1 * j
        const next2 = j === m ? end2 : start2 + slope2 * j
        const nu1 = a11 * u1 + a12 * v1 + b1 * f1 + c1 * next1
        const nv1 = a21 * u1 + a22 * v1 + b2 * f1 + c2 * next1
        const nu2 = a11 * u2 + a12 * v2 + b1 * f2 + c1 * next2
        const nv2 = a21 * u2 + a22 * v2 + b2 * f2 + c2 * next2
        u1 = nu1
        v1 = nv1
        u2 = nu2
        v2 = nv2
        const a1 = cc * v1 + kk * u1
        const a2 = cc * v2 + kk * u2
        hu1[nu] = u1
        hu2[nu] = u2
        hv1[nv] = v1
        hv2[nv] = v2
        ha1[na] = a1
        ha2[na] = a2
        if (u1 * u1 + u2 * u2 > skipU) nu++
        if (v1 * v1 + v2 * v2 > skipV) nv++
        if (a1 * a1 + a2 * a2 > skipA) na++
        n++
        f1 = next1
        f2 = next2
      }
      start1 = end1
      start2 = end2
    }
    block.kept[0] = nu
    block.kept[1] = nv
    block.kept[2] = na
    fold(block, n)
  }
  return { u1, v1, u2, v2 }
}

export function createJsKernel(): SweepKernel {
  let record: Float64Array = new Float64Array(0)
  let loaded: Float64Array | null = null
  let block: HistoryBlock | undefined
  let otherBlock: HistoryBlock | undefined
  return {
    name: 'js',
    lanes: 1,
    width: 1,
    loadRecord(next) {
      record = next.slice()
      loaded = next
    },
    get loadedRecord() {
      return loaded
    },
    sweep(count, subSteps, stepS, coeffs, out, candidates) {
      return jsSweep(record, count, subSteps, stepS, coeffs, out, candidates)
    },
    pairHistories(first, second, subSteps, coeffs, fold, skip) {
      block ??= historyBlock()
      return jsPairHistories(first, second, subSteps, coeffs, block, fold, skip)
    },
    pairHistoriesTwo(first, second, subSteps, one, other) {
      // One after the other: each oscillator's blocks, skips and folds are as when run alone.
      block ??= historyBlock()
      otherBlock ??= historyBlock()
      return [
        jsPairHistories(first, second, subSteps, one.coeffs, block, one.fold, one.skip),
        jsPairHistories(first, second, subSteps, other.coeffs, otherBlock, other.fold, other.skip),
      ]
    },
  }
}

/** The parts of the WebAssembly API used here, declared so this runs without DOM typings. */
interface WasmApi {
  Module: new (bytes: Uint8Array<ArrayBuffer>) => object
  Instance: new (module: object, imports: object) => { exports: unknown }
}

interface KernelExports {
  memory: { buffer: ArrayBuffer; grow(pages: number): number }
  heapBase(): number
  sweep(
    count: number,
    samples: number,
    subSteps: number,
    invStep: number,
    coeffs: number,
    record: number,
    out: number,
    scratch: number,
    candidates: number,
  ): number
  pairHistories: PairHistoriesExport
  pairHistoriesTwo: PairHistoriesExport
}

/** The history mode's exports (one oscillator, or two side by side; layout in sweepKernel.as). */
type PairHistoriesExport = (
  record: number,
  first: number,
  intervals: number,
  subSteps: number,
  coeffs: number,
  state: number,
  out: number,
  stride: number,
  skip: number,
  kept: number,
) => void

function decodeBase64(base64: string): Uint8Array<ArrayBuffer> {
  const binary = atob(base64)
  const bytes = new Uint8Array(binary.length)
  for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i)
  return bytes
}

const PAGE_BYTES = 65_536
/** Bytes of the kernel's forcing scratch area: BLOCK_STEPS + 1 values in sweepKernel.as, rounded to 16. */
const SCRATCH_BYTES = (4096 + 2) * 8
const align16 = (address: number) => Math.ceil(address / 16) * 16

/**
 * Instantiates the WebAssembly kernel synchronously (allowed in Node and in
 * workers; the module is small enough for a browser main thread too). Returns
 * null where WebAssembly or its SIMD extension is unavailable.
 */
export function createWasmKernel(): SweepKernel | null {
  const wasm = (globalThis as { WebAssembly?: WasmApi }).WebAssembly
  if (!wasm) return null
  let exports: KernelExports
  try {
    const module = new wasm.Module(decodeBase64(SWEEP_KERNEL_WASM_BASE64))
    const instance = new wasm.Instance(module, {
      env: {
        abort() {
          throw new Error('sweep kernel aborted')
        },
      },
    })
    exports = instance.exports as unknown as KernelExports
  } catch {
    return null
  }
  const base = exports.heapBase()
  let samples = 0
  let loaded: Float64Array | null = null
  const ensureBytes = (bytes: number) => {
    const missing = bytes - exports.memory.buffer.byteLength
    if (missing > 0) exports.memory.grow(Math.ceil(missing / PAGE_BYTES))
  }
  const recordBytes = () => samples * 8
  // History mode: the pair interleaved at `base` (over any record), then, for two oscillators
  // (the second's after the first's in each), coefficients (2 × 10 f64), state (2 × 4 f64), skip
  // (2 × 3 f64 and a spare) and kept (2 × 3 i32 and a spare), then six history arrays of
  // HISTORY_BLOCK values for each.
  let pairFirst: Float64Array | null = null
  let pairSecond: Float64Array | null = null
  let pairCoeffsAt = 0
  interface LaneViews {
    block: HistoryBlock
    coeffs: Float64Array
    state: Float64Array
    skip: Float64Array
  }
  let views: {
    buffer: ArrayBuffer
    lanes: [LaneViews, LaneViews]
    stateAt: number
    skipAt: number
    keptAt: number
  } | null = null
  const historyBytes = HISTORY_BLOCK * 8
  const loadPair = (first: Float64Array, second: Float64Array) => {
    const pairSamples = first.length
    pairCoeffsAt = align16(base + 2 * pairSamples * 8)
    ensureBytes(pairCoeffsAt + PAIR_HEADER_BYTES + 12 * historyBytes)
    const interleaved = new Float64Array(exports.memory.buffer, base, 2 * pairSamples)
    for (let i = 0; i < pairSamples; i++) {
      interleaved[2 * i] = first[i]!
      interleaved[2 * i + 1] = second[i]!
    }
    pairFirst = first
    pairSecond = second
    loaded = null
    views = null
  }
  const pairViews = () => {
    const buffer = exports.memory.buffer
    if (views?.buffer !== buffer) {
      const stateAt = pairCoeffsAt + 2 * PAIR_COEFFICIENTS * 8
      const skipAt = stateAt + 8 * 8
      const keptAt = skipAt + 8 * 8
      const outAt = pairCoeffsAt + PAIR_HEADER_BYTES
      const array = (k: number) => new Float64Array(buffer, outAt + k * historyBytes, HISTORY_BLOCK)
      const lane = (l: number): LaneViews => ({
        coeffs: new Float64Array(buffer, pairCoeffsAt + l * PAIR_COEFFICIENTS * 8, PAIR_COEFFICIENTS),
        state: new Float64Array(buffer, stateAt + l * 32, 4),
        skip: new Float64Array(buffer, skipAt + l * 32, 3),
        block: {
          u1: array(6 * l),
          u2: array(6 * l + 1),
          v1: array(6 * l + 2),
          v2: array(6 * l + 3),
          a1: array(6 * l + 4),
          a2: array(6 * l + 5),
          kept: new Int32Array(buffer, keptAt + l * 16, 3),
        },
      })
      views = { buffer, lanes: [lane(0), lane(1)], stateAt, skipAt, keptAt }
    }
    return views
  }
  /** Runs `run` (one oscillator's export, or two's) over the pair a block at a time, folding each lane's block. */
  const historiesOver = (
    first: Float64Array,
    second: Float64Array,
    subSteps: number,
    lanes: readonly HistoryLane[],
    run: PairHistoriesExport,
  ): PairEndState[] => {
    checkPairHistories(first, second, subSteps)
    // A nested sweep (from a progress report between oscillators) may have loaded a record meanwhile.
    if (pairFirst !== first || pairSecond !== second) loadPair(first, second)
    const { lanes: parts, stateAt, skipAt, keptAt } = pairViews()
    lanes.forEach((lane, l) => {
      parts[l]!.coeffs.set(lane.coeffs.subarray(0, PAIR_COEFFICIENTS))
      parts[l]!.state.fill(0)
    })
    const outAt = parts[0].block.u1.byteOffset
    const intervals = first.length - 1
    const perBlock = Math.floor(HISTORY_BLOCK / subSteps)
    for (let done = 0; done < intervals; done += perBlock) {
      const count = Math.min(perBlock, intervals - done)
      lanes.forEach((lane, l) => parts[l]!.skip.set((lane.skip ?? KEEP_ALL).subarray(0, 3)))
      run(base, done, count, subSteps, pairCoeffsAt, stateAt, outAt, historyBytes, skipAt, keptAt)
      lanes.forEach((lane, l) => lane.fold(parts[l]!.block, count * subSteps))
    }
    return lanes.map((_, l) => {
      const state = parts[l]!.state
      return { u1: state[0]!, v1: state[2]!, u2: state[1]!, v2: state[3]! }
    })
  }
  return {
    name: 'wasm-simd',
    lanes: 2,
    width: 2,
    loadRecord(record) {
      samples = record.length
      ensureBytes(base + recordBytes())
      new Float64Array(exports.memory.buffer, base, samples).set(record)
      loaded = record
      pairFirst = null
      pairSecond = null
    },
    get loadedRecord() {
      return loaded
    },
    sweep(count, subSteps, stepS, coeffs, out, candidates) {
      if (count % 2 !== 0) throw new RangeError('the WebAssembly kernel takes oscillators in pairs')
      const scratchAt = align16(base + recordBytes())
      const coeffsAt = scratchAt + SCRATCH_BYTES
      const outAt = coeffsAt + COEFFICIENT_ARRAYS * count * 8
      const candidatesAt = outAt + OUTPUT_ARRAYS * count * 8
      const capacity = Math.min(candidates.capacity, Math.floor(candidates.values.length / CANDIDATE_VALUES))
      ensureBytes(candidatesAt + CANDIDATE_VALUES * capacity * 8)
      new Float64Array(exports.memory.buffer, coeffsAt, COEFFICIENT_ARRAYS * count).set(
        coeffs.subarray(0, COEFFICIENT_ARRAYS * count),
      )
      // The kernel grows the memory itself where the candidates outrun this room.
      const found = exports.sweep(
        count,
        samples,
        subSteps,
        1 / stepS,
        coeffsAt,
        base,
        outAt,
        scratchAt,
        candidatesAt,
      )
      out.set(new Float64Array(exports.memory.buffer, outAt, OUTPUT_ARRAYS * count))
      if (found > capacity) enlarged(candidates, 0, Math.max(found, 2 * capacity))
      candidates.values.set(new Float64Array(exports.memory.buffer, candidatesAt, CANDIDATE_VALUES * found))
      return found
    },
    pairHistories(first, second, subSteps, coeffs, fold, skip) {
      return historiesOver(first, second, subSteps, [{ coeffs, fold, skip }], exports.pairHistories)[0]!
    },
    pairHistoriesTwo(first, second, subSteps, one, other) {
      const [a, b] = historiesOver(first, second, subSteps, [one, other], exports.pairHistoriesTwo)
      return [a!, b!]
    },
  }
}

let sharedWasm: SweepKernel | null | undefined
let sharedJs: SweepKernel | undefined

/** The WebAssembly kernel, instantiated once (V8 optimises it after its first calls); null where unavailable. */
export function wasmKernel(): SweepKernel | null {
  if (sharedWasm === undefined) sharedWasm = createWasmKernel()
  return sharedWasm
}

export function jsKernel(): SweepKernel {
  sharedJs ??= createJsKernel()
  return sharedJs
}

/** The fastest kernel this runtime supports. */
export function defaultKernel(): SweepKernel {
  return wasmKernel() ?? jsKernel()
}

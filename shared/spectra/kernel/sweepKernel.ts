/**
 * The oscillator-sweep kernel: advances many single-degree-of-freedom
 * oscillators through one record with the same sub-step count, keeps the
 * peaks of |u|, |v| and |A| (absolute acceleration) at step ends with the
 * steps they occur at, and lists the steps whose interior may hold a larger
 * value (candidates, resolved in closed form or from interpolants by
 * betweenSteps.ts).
 *
 * Two implementations give the same bits: a WebAssembly SIMD kernel compiled
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
 * - coeffs (18·count): a11, a12, b1, c1, a21, a22, b2, c2, cc, kk, ω, q, σ, 1/ω_D, 1/k, c/k², up, vp;
 * - out (7·count): max|u|, max|v|, max|A|, step of max|u|, step of max|A|, u at end, v at end;
 * - candidates (4 per entry): oscillator index, step, u and v at the step's start.
 */
import { SWEEP_KERNEL_WASM_BASE64 } from './sweepKernelWasm.generated.js'

export type KernelName = 'wasm-simd' | 'js'

export const COEFFICIENT_ARRAYS = 18
export const OUTPUT_ARRAYS = 7
/** Values per candidate entry. */
export const CANDIDATE_VALUES = 4

/** Where the kernel lists candidate steps: `capacity` entries of CANDIDATE_VALUES values. */
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
   * Runs the sweep; returns how many candidate steps were found. Entries beyond
   * the buffer's capacity are counted but not written (run again with a larger buffer).
   */
  sweep(
    count: number,
    subSteps: number,
    stepS: number,
    coeffs: Float64Array,
    out: Float64Array,
    candidates: CandidateBuffer,
  ): number
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

/** The JavaScript kernel, one oscillator at a time with its state in locals. */
export function jsSweep(
  record: Float64Array,
  count: number,
  subSteps: number,
  stepS: number,
  coeffs: Float64Array,
  out: Float64Array,
  candidates: CandidateBuffer,
): number {
  const samples = record.length
  const m = subSteps
  const invH = 1 / stepS
  const list = candidates.values
  const capacity = Math.min(candidates.capacity, Math.floor(list.length / CANDIDATE_VALUES))
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
    let maxU = 0
    let maxV = 0
    let maxA = 0
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
        const eu = Math.max(pu, au)
        const ev = Math.max(pv, av)
        const ea = Math.max(pa, aa)
        const wu = maxU + up
        const w = wu + (maxV + vp + sg * wu) * iwd
        const mu = q * w
        if (eu + mu > maxU || ev + om * mu > maxV || ea + kk * mu > maxA) {
          if (
            preciseCandidate(u0, v0, f, fNext, invH, eu, ev, ea, maxU, maxV, maxA, om, q, sg, iwd, ik, ck, kk)
          ) {
            if (found < capacity) {
              const at = CANDIDATE_VALUES * found
              list[at] = o
              list[at + 1] = step
              list[at + 2] = u0
              list[at + 3] = v0
            }
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

export function createJsKernel(): SweepKernel {
  let record: Float64Array = new Float64Array(0)
  let loaded: Float64Array | null = null
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
    capacity: number,
  ): number
}

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
  return {
    name: 'wasm-simd',
    lanes: 2,
    width: 2,
    loadRecord(record) {
      samples = record.length
      ensureBytes(base + recordBytes())
      new Float64Array(exports.memory.buffer, base, samples).set(record)
      loaded = record
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
        capacity,
      )
      out.set(new Float64Array(exports.memory.buffer, outAt, OUTPUT_ARRAYS * count))
      const written = CANDIDATE_VALUES * Math.min(found, capacity)
      candidates.values.set(new Float64Array(exports.memory.buffer, candidatesAt, written))
      return found
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

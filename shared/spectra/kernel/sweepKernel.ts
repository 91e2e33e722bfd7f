/**
 * The oscillator-sweep kernel: advances many single-degree-of-freedom
 * oscillators through one record with the same sub-step count and keeps the
 * peaks of |u|, |v| and |A| (absolute acceleration) with the steps they occur at.
 *
 * Two implementations give the same bits: a WebAssembly SIMD kernel compiled
 * from sweepKernel.as (four oscillators per pass as two f64x2 vectors, a last
 * pair as one) and a
 * plain JavaScript kernel, the reference and the fallback where WebAssembly
 * SIMD is unavailable. Both evaluate, per oscillator and sub-step,
 *   u' = ((a11·u + a12·v) + b1·f) + c1·f'
 *   v' = ((a21·u + a22·v) + b2·f) + c2·f'
 *   |A| = |cc·v' + kk·u'|
 * with f, f' the ground acceleration interpolated linearly between samples:
 * f_j = f_start + ((f_end − f_start)/m)·j for 0 < j < m, and f_m = f_end.
 *
 * Layout, structure of arrays, `count` oscillators:
 * - coeffs (10·count): a11, a12, b1, c1, a21, a22, b2, c2, cc, kk;
 * - out (7·count): max|u|, max|v|, max|A|, step of max|u|, step of max|A|, u at end, v at end.
 */
import { SWEEP_KERNEL_WASM_BASE64 } from './sweepKernelWasm.generated.js'

export type KernelName = 'wasm-simd' | 'js'

export const COEFFICIENT_ARRAYS = 10
export const OUTPUT_ARRAYS = 7

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
  sweep(count: number, subSteps: number, coeffs: Float64Array, out: Float64Array): void
}

/** The JavaScript kernel, one oscillator at a time with its state in locals. */
export function jsSweep(
  record: Float64Array,
  count: number,
  subSteps: number,
  coeffs: Float64Array,
  out: Float64Array,
): void {
  const samples = record.length
  const m = subSteps
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
    let u = 0
    let v = 0
    let maxU = 0
    let maxV = 0
    let maxA = 0
    let stepU = 0
    let stepA = 0
    let step = 0
    let start = record[0]!
    for (let i = 1; i < samples; i++) {
      const end = record[i]!
      const slope = (end - start) / m
      let f = start
      for (let j = 1; j <= m; j++) {
        const fNext = j === m ? end : start + slope * j
        step += 1
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
    sweep(count, subSteps, coeffs, out) {
      jsSweep(record, count, subSteps, coeffs, out)
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
    coeffs: number,
    record: number,
    out: number,
    scratch: number,
  ): void
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
    width: 4,
    loadRecord(record) {
      samples = record.length
      ensureBytes(base + recordBytes())
      new Float64Array(exports.memory.buffer, base, samples).set(record)
      loaded = record
    },
    get loadedRecord() {
      return loaded
    },
    sweep(count, subSteps, coeffs, out) {
      if (count % 2 !== 0) throw new RangeError('the WebAssembly kernel takes oscillators in pairs')
      const scratchAt = align16(base + recordBytes())
      const coeffsAt = scratchAt + SCRATCH_BYTES
      const outAt = coeffsAt + COEFFICIENT_ARRAYS * count * 8
      ensureBytes(outAt + OUTPUT_ARRAYS * count * 8)
      new Float64Array(exports.memory.buffer, coeffsAt, COEFFICIENT_ARRAYS * count).set(
        coeffs.subarray(0, COEFFICIENT_ARRAYS * count),
      )
      exports.sweep(count, samples, subSteps, coeffsAt, base, outAt, scratchAt)
      out.set(new Float64Array(exports.memory.buffer, outAt, OUTPUT_ARRAYS * count))
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

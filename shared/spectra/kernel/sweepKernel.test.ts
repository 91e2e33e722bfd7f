import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { KERNEL_MODULE_PATH, compileKernel, kernelModuleText } from '../../../scripts/buildKernel.mjs'
import { mulberry32 } from '../demo/demoRecords.js'
import {
  CANDIDATE_VALUES,
  COEFFICIENT_ARRAYS,
  OUTPUT_ARRAYS,
  createJsKernel,
  createWasmKernel,
} from './sweepKernel.js'

/** The candidate entries as sorted strings: the kernels list the same steps, in different orders. */
function entries(values: Float64Array, found: number): string[] {
  const list: string[] = []
  for (let e = 0; e < found; e++)
    list.push(Array.from(values.subarray(CANDIDATE_VALUES * e, CANDIDATE_VALUES * (e + 1))).join(' '))
  return list.sort()
}

describe('sweep kernels', () => {
  const random = mulberry32(42)
  const record = Float64Array.from({ length: 400 }, () => random() - 0.5)
  const count = 14
  // Coefficients of stable-looking recurrences; the kernels must agree on any numbers. The
  // bound coefficients (ω onwards) are positive, the margin factor q small enough that some
  // steps are listed and some are not.
  const coeffs = Float64Array.from({ length: COEFFICIENT_ARRAYS * count }, (_, i) =>
    i < 10 * count ? 0.5 * (random() - 0.5) : i < 11 * count || i >= 12 * count ? random() : 0.01 * random(),
  )

  it('the WebAssembly SIMD kernel and the JavaScript kernel give the same bits', () => {
    const wasm = createWasmKernel()
    expect(wasm).not.toBeNull()
    const js = createJsKernel()
    for (const subSteps of [1, 3, 8]) {
      const fromWasm = new Float64Array(OUTPUT_ARRAYS * count)
      const fromJs = new Float64Array(OUTPUT_ARRAYS * count)
      const wasmList = { values: new Float64Array(CANDIDATE_VALUES * 20_000), capacity: 20_000 }
      const jsList = { values: new Float64Array(CANDIDATE_VALUES * 20_000), capacity: 20_000 }
      wasm!.loadRecord(record)
      const wasmFound = wasm!.sweep(count, subSteps, 0.01 / subSteps, coeffs, fromWasm, wasmList)
      js.loadRecord(record)
      const jsFound = js.sweep(count, subSteps, 0.01 / subSteps, coeffs, fromJs, jsList)
      expect(Array.from(fromWasm)).toEqual(Array.from(fromJs))
      expect(wasmFound).toBe(jsFound)
      expect(jsFound).toBeGreaterThan(0)
      expect(jsFound).toBeLessThan(count * (record.length - 1) * subSteps)
      expect(entries(wasmList.values, wasmFound)).toEqual(entries(jsList.values, jsFound))
      // Steps of the peaks lie within the run; the peaks are not trivially zero.
      expect(fromJs[0]).toBeGreaterThan(0)
      expect(fromJs[3 * count]).toBeLessThanOrEqual((record.length - 1) * subSteps)
    }
  })

  it('rejects an odd oscillator count in WebAssembly', () => {
    const wasm = createWasmKernel()!
    wasm.loadRecord(record)
    const list = { values: new Float64Array(0), capacity: 0 }
    expect(() => wasm.sweep(3, 1, 0.01, coeffs, new Float64Array(OUTPUT_ARRAYS * 3), list)).toThrow(
      RangeError,
    )
  })

  it('the committed WebAssembly module is what the kernel source compiles to (npm run build:kernel)', async () => {
    const binary = await compileKernel()
    expect(kernelModuleText(binary)).toBe(readFileSync(KERNEL_MODULE_PATH, 'utf8'))
  }, 60_000)
})

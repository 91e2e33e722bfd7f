import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { KERNEL_MODULE_PATH, compileKernel, kernelModuleText } from '../../../scripts/buildKernel.mjs'
import { mulberry32 } from '../demo/demoRecords.js'
import { COEFFICIENT_ARRAYS, OUTPUT_ARRAYS, createJsKernel, createWasmKernel } from './sweepKernel.js'

describe('sweep kernels', () => {
  const random = mulberry32(42)
  const record = Float64Array.from({ length: 400 }, () => random() - 0.5)
  const count = 14 // three groups of four and a pair
  // Coefficients of stable-looking recurrences; the kernels must agree on any numbers.
  const coeffs = Float64Array.from({ length: COEFFICIENT_ARRAYS * count }, () => 0.5 * (random() - 0.5))

  it('the WebAssembly SIMD kernel and the JavaScript kernel give the same bits', () => {
    const wasm = createWasmKernel()
    expect(wasm).not.toBeNull()
    const js = createJsKernel()
    for (const subSteps of [1, 3, 8]) {
      const fromWasm = new Float64Array(OUTPUT_ARRAYS * count)
      const fromJs = new Float64Array(OUTPUT_ARRAYS * count)
      wasm!.loadRecord(record)
      wasm!.sweep(count, subSteps, coeffs, fromWasm)
      js.loadRecord(record)
      js.sweep(count, subSteps, coeffs, fromJs)
      expect(Array.from(fromWasm)).toEqual(Array.from(fromJs))
      // Steps of the peaks lie within the run; the peaks are not trivially zero.
      expect(fromJs[0]).toBeGreaterThan(0)
      expect(fromJs[3 * count]).toBeLessThanOrEqual((record.length - 1) * subSteps)
    }
  })

  it('rejects an odd oscillator count in WebAssembly', () => {
    const wasm = createWasmKernel()!
    wasm.loadRecord(record)
    expect(() => wasm.sweep(3, 1, coeffs, new Float64Array(OUTPUT_ARRAYS * 3))).toThrow(RangeError)
  })

  it('the committed WebAssembly module is what the kernel source compiles to (npm run build:kernel)', async () => {
    const binary = await compileKernel()
    expect(kernelModuleText(binary)).toBe(readFileSync(KERNEL_MODULE_PATH, 'utf8'))
  }, 60_000)
})

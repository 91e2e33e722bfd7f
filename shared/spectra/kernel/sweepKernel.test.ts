import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { KERNEL_MODULE_PATH, compileKernel, kernelModuleText } from '../../../scripts/buildKernel.mjs'
import { mulberry32 } from '../demo/demoRecords.js'
import { MAX_SUB_STEPS } from '../subSteps.js'
import {
  CANDIDATE_VALUES,
  COEFFICIENT_ARRAYS,
  HISTORY_BLOCK,
  type HistoryBlock,
  OUTPUT_ARRAYS,
  PAIR_COEFFICIENTS,
  type SweepKernel,
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
  // The last three arrays, the running peaks' start values, are 0 here (see the test of them).
  const coeffs = Float64Array.from({ length: COEFFICIENT_ARRAYS * count }, (_, i) =>
    i >= 18 * count
      ? 0
      : i < 10 * count
        ? 0.5 * (random() - 0.5)
        : i < 11 * count || i >= 12 * count
          ? random()
          : 0.01 * random(),
  )

  it('start the running peaks from given values: the same bits in both kernels, fewer steps listed, and the same peaks where the values lie below them', () => {
    const wasm = createWasmKernel()!
    const js = createJsKernel()
    const sweep = (kernel: ReturnType<typeof createJsKernel>, c: Float64Array) => {
      const out = new Float64Array(OUTPUT_ARRAYS * count)
      const list = { values: new Float64Array(CANDIDATE_VALUES * 20_000), capacity: 20_000 }
      kernel.loadRecord(record)
      const found = kernel.sweep(count, 3, 0.01 / 3, c, out, list)
      return { out, found, list: entries(list.values, found) }
    }
    const fromZero = sweep(js, coeffs)
    // Start each peak at 90% of the peak the sweep from 0 found.
    const started = coeffs.slice()
    for (let q = 0; q < 3; q++)
      for (let o = 0; o < count; o++) started[(18 + q) * count + o] = 0.9 * fromZero.out[q * count + o]!
    const fromStartJs = sweep(js, started)
    const fromStartWasm = sweep(wasm, started)
    expect(Array.from(fromStartWasm.out)).toEqual(Array.from(fromStartJs.out))
    expect(fromStartWasm.list).toEqual(fromStartJs.list)
    // Below the peaks, the start values change no peak, no peak step and no end state...
    expect(Array.from(fromStartJs.out)).toEqual(Array.from(fromZero.out))
    // ...and list a subset of the steps.
    expect(fromStartJs.found).toBeLessThan(fromZero.found)
    const listed = new Set(fromZero.list.map((entry) => JSON.stringify(entry)))
    expect(fromStartJs.list.every((entry) => listed.has(JSON.stringify(entry)))).toBe(true)
  })

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

  it('agree where a value is not a number (running maxima skip NaN in both)', () => {
    const broken = record.slice()
    broken[150] = Number.NaN
    const fromWasm = new Float64Array(OUTPUT_ARRAYS * count)
    const fromJs = new Float64Array(OUTPUT_ARRAYS * count)
    const list = () => ({ values: new Float64Array(CANDIDATE_VALUES * 20_000), capacity: 20_000 })
    const wasm = createWasmKernel()!
    const js = createJsKernel()
    wasm.loadRecord(broken)
    js.loadRecord(broken)
    const wasmList = list()
    const jsList = list()
    const wasmFound = wasm.sweep(count, 3, 0.01 / 3, coeffs, fromWasm, wasmList)
    const jsFound = js.sweep(count, 3, 0.01 / 3, coeffs, fromJs, jsList)
    // The peaks stop at the last value before the NaN; the state at the end is NaN.
    expect(fromJs.subarray(0, count).every((peak) => Number.isFinite(peak) && peak > 0)).toBe(true)
    expect(Number.isNaN(fromJs[5 * count])).toBe(true)
    expect(Array.from(fromWasm)).toEqual(Array.from(fromJs))
    expect(wasmFound).toBe(jsFound)
    expect(entries(wasmList.values, wasmFound)).toEqual(entries(jsList.values, jsFound))
  })

  it('list every candidate step, enlarging a buffer too small for them (WebAssembly: its memory too)', () => {
    const long = Float64Array.from({ length: 5000 }, () => random() - 0.5)
    const roomy = () => ({ values: new Float64Array(CANDIDATE_VALUES * 100_000), capacity: 100_000 })
    // A fresh instance: its memory starts at what the record, coefficients and 16 entries need.
    for (const kernel of [createWasmKernel()!, createJsKernel()]) {
      kernel.loadRecord(long)
      const small = { values: new Float64Array(CANDIDATE_VALUES * 16), capacity: 16 }
      const large = roomy()
      const out = new Float64Array(OUTPUT_ARRAYS * count)
      const found = kernel.sweep(count, 8, 0.01 / 8, coeffs, out, small)
      // More entries than two 64 KiB pages hold, so the WebAssembly kernel had to grow its memory.
      expect(found).toBeGreaterThan(5000)
      expect(small.capacity).toBeGreaterThanOrEqual(found)
      expect(small.values.length).toBeGreaterThanOrEqual(CANDIDATE_VALUES * found)
      expect(kernel.sweep(count, 8, 0.01 / 8, coeffs, out, large)).toBe(found)
      expect(large.capacity).toBe(100_000)
      expect(entries(small.values, found)).toEqual(entries(large.values, found))
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

describe('history mode (pairs)', () => {
  const random = mulberry32(7)
  const samples = 1200
  const first = Float64Array.from({ length: samples }, () => random() - 0.5)
  const second = Float64Array.from({ length: samples }, () => 2 * (random() - 0.5))
  // Any numbers serve: the two kernels must agree on them bit for bit.
  const coeffs = Float64Array.from({ length: PAIR_COEFFICIENTS }, () => random() - 0.5)
  const keys = ['u1', 'u2', 'v1', 'v2', 'a1', 'a2'] as const

  /** Every block's values joined into whole histories, with the block lengths and the end state. */
  type Whole = Record<(typeof keys)[number], Float64Array>
  function histories(kernel: SweepKernel, subSteps: number, withCoeffs: Float64Array = coeffs) {
    const total = (samples - 1) * subSteps
    const make = () => new Float64Array(total)
    const whole: Whole = { u1: make(), u2: make(), v1: make(), v2: make(), a1: make(), a2: make() }
    const counts: number[] = []
    let at = 0
    const end = kernel.pairHistories(first, second, subSteps, withCoeffs, (block: HistoryBlock, count) => {
      // With no skip, every sample of every quantity is kept.
      expect(Array.from(block.kept)).toEqual([count, count, count])
      counts.push(count)
      for (const key of keys) whole[key].set(block[key].subarray(0, count), at)
      at += count
    })
    return { whole, counts, end, written: at }
  }
  /** The histories' bytes, for a fast bit-for-bit comparison of long arrays. */
  const bytes = (whole: Whole) => keys.map((key) => Buffer.from(whole[key].buffer).toString('base64'))

  /** With a skip that rises from block to block: each quantity's kept samples, joined. */
  function keptSamples(
    kernel: SweepKernel,
    subSteps: number,
    radii: (block: number) => number[],
    withCoeffs: Float64Array = coeffs,
  ) {
    const kept: Whole = {
      u1: new Float64Array(0),
      u2: new Float64Array(0),
      v1: new Float64Array(0),
      v2: new Float64Array(0),
      a1: new Float64Array(0),
      a2: new Float64Array(0),
    }
    const skip = Float64Array.from(radii(0))
    const perBlock: number[][] = []
    let blocks = 0
    kernel.pairHistories(
      first,
      second,
      subSteps,
      withCoeffs,
      (block) => {
        perBlock.push(Array.from(skip))
        keys.forEach((key, k) => {
          const count = block.kept[Math.floor(k / 2)]!
          const joined = new Float64Array(kept[key].length + count)
          joined.set(kept[key])
          joined.set(block[key].subarray(0, count), kept[key].length)
          kept[key] = joined
        })
        blocks++
        skip.set(radii(blocks))
      },
      skip,
    )
    return { kept, perBlock }
  }

  it('with a skip, both kernels keep the same samples: those outside the radius read before each block', () => {
    const subSteps = 8
    const { whole } = histories(createJsKernel(), subSteps)
    const square = (x: number, y: number) => x * x + y * y
    // A typical squared radius of each quantity, raised block by block as the peaks would be.
    const scale = (x: Float64Array, y: Float64Array) => square(x[100]!, y[100]!) + square(x[500]!, y[500]!)
    const base = [scale(whole.u1, whole.u2), scale(whole.v1, whole.v2), scale(whole.a1, whole.a2)]
    const radii = (block: number) => base.map((value) => value * (0.2 + 0.1 * block))
    const fromWasm = keptSamples(createWasmKernel()!, subSteps, radii)
    const fromJs = keptSamples(createJsKernel(), subSteps, radii)
    expect(bytes(fromWasm.kept)).toEqual(bytes(fromJs.kept))
    expect(fromJs.perBlock.length).toBeGreaterThan(1)
    // The same samples as filtering the whole histories by hand.
    const expected: Record<string, number[]> = { u1: [], u2: [], v1: [], v2: [], a1: [], a2: [] }
    const blockLength = Math.floor(HISTORY_BLOCK / subSteps) * subSteps
    for (let n = 0; n < whole.u1.length; n++) {
      const limits = fromJs.perBlock[Math.floor(n / blockLength)]!
      ;(['u', 'v', 'a'] as const).forEach((q, k) => {
        const x = whole[`${q}1`][n]!
        const y = whole[`${q}2`][n]!
        if (square(x, y) > limits[k]!) {
          expected[`${q}1`]!.push(x)
          expected[`${q}2`]!.push(y)
        }
      })
    }
    for (const key of keys) {
      expect(Array.from(fromJs.kept[key])).toEqual(expected[key])
      expect(fromJs.kept[key].length).toBeGreaterThan(0)
      expect(fromJs.kept[key].length).toBeLessThan(whole[key].length)
    }
  })

  it('the WebAssembly SIMD kernel and the JavaScript kernel give the same bits, over several blocks', () => {
    const wasm = createWasmKernel()!
    const js = createJsKernel()
    for (const subSteps of [1, 3, 8, 50]) {
      const fromWasm = histories(wasm, subSteps)
      const fromJs = histories(js, subSteps)
      expect(bytes(fromWasm.whole)).toEqual(bytes(fromJs.whole))
      expect(fromWasm.end).toEqual(fromJs.end)
      expect(fromWasm.counts).toEqual(fromJs.counts)
      expect(fromJs.written).toBe((samples - 1) * subSteps)
      if (subSteps >= 8) expect(fromJs.counts.length).toBeGreaterThan(1)
      expect(fromJs.whole.u1.at(-1)).toBe(fromJs.end.u1)
      expect(fromJs.whole.v2.at(-1)).toBe(fromJs.end.v2)
      expect(fromJs.whole.u1.at(-1)).not.toBe(fromJs.whole.u2.at(-1))
    }
  })

  it('two oscillators at once: each gets the bits, blocks and kept samples it gets alone, in both kernels', () => {
    const other = Float64Array.from({ length: PAIR_COEFFICIENTS }, () => random() - 0.5)
    for (const subSteps of [1, 8]) {
      const alone = [histories(createJsKernel(), subSteps), histories(createJsKernel(), subSteps, other)]
      const radii = (block: number) => [0.5, 0.4, 0.3].map((r) => r * (1 + 0.1 * block))
      const keptAlone = [coeffs, other].map((c) => keptSamples(createJsKernel(), subSteps, radii, c))
      for (const kernel of [createWasmKernel()!, createJsKernel()]) {
        // Whole histories, every sample kept.
        const lanes = [coeffs, other].map((c) => {
          const total = (samples - 1) * subSteps
          const whole: Whole = {
            u1: new Float64Array(total),
            u2: new Float64Array(total),
            v1: new Float64Array(total),
            v2: new Float64Array(total),
            a1: new Float64Array(total),
            a2: new Float64Array(total),
          }
          let at = 0
          const fold = (block: HistoryBlock, count: number) => {
            for (const key of keys) whole[key].set(block[key].subarray(0, count), at)
            at += count
          }
          return { whole, lane: { coeffs: c, fold } }
        })
        const ends = kernel.pairHistoriesTwo(first, second, subSteps, lanes[0]!.lane, lanes[1]!.lane)
        lanes.forEach((lane, l) => {
          expect(bytes(lane.whole)).toEqual(bytes(alone[l]!.whole))
          expect(ends[l]).toEqual(alone[l]!.end)
        })
        // With skips that rise block by block, each lane's own.
        const kept = [coeffs, other].map(() => ({
          samples: [] as number[][],
          skip: Float64Array.from(radii(0)),
          blocks: 0,
        }))
        const skipLanes = [coeffs, other].map((c, l) => ({
          coeffs: c,
          skip: kept[l]!.skip,
          fold: (block: HistoryBlock) => {
            const lane = kept[l]!
            keys.forEach((key, k) => {
              lane.samples[k] = [
                ...(lane.samples[k] ?? []),
                ...block[key].subarray(0, block.kept[Math.floor(k / 2)]!),
              ]
            })
            lane.blocks++
            lane.skip.set(radii(lane.blocks))
          },
        }))
        kernel.pairHistoriesTwo(first, second, subSteps, skipLanes[0]!, skipLanes[1]!)
        kept.forEach((lane, l) => {
          keys.forEach((key, k) =>
            expect(lane.samples[k], `${kernel.name} lane ${l} ${key}`).toEqual(
              Array.from(keptAlone[l]!.kept[key]),
            ),
          )
        })
      }
    }
  })

  it('is the recurrence itself: u′ = ((a11·u + a12·v) + b1·f) + c1·f′ on each component from rest', () => {
    const [a11, a12, b1, c1, a21, a22, b2, c2, cc, kk] = Array.from(coeffs)
    const { whole } = histories(createWasmKernel()!, 2)
    let u = 0
    let v = 0
    for (let n = 0; n < 2 * (samples - 1); n++) {
      // Two sub-steps per interval i: g_i → g_i + ((g_(i+1) − g_i)/2)·1 → g_(i+1).
      const i = Math.floor(n / 2)
      const middle = second[i]! + ((second[i + 1]! - second[i]!) / 2) * 1
      const f = n % 2 === 0 ? second[i]! : middle
      const next = n % 2 === 0 ? middle : second[i + 1]!
      const nu = a11! * u + a12! * v + b1! * f + c1! * next
      const nv = a21! * u + a22! * v + b2! * f + c2! * next
      u = nu
      v = nv
      expect(whole.u2[n]).toBe(u)
      expect(whole.v2[n]).toBe(v)
      expect(whole.a2[n]).toBe(cc! * v + kk! * u)
    }
  })

  it('reloads the pair after a record sweep in between, and makes the record sweep reload', () => {
    const wasm = createWasmKernel()!
    const before = histories(wasm, 3)
    expect(wasm.loadedRecord).toBeNull()
    const record = Float64Array.from({ length: 5000 }, () => random())
    wasm.loadRecord(record)
    const list = { values: new Float64Array(CANDIDATE_VALUES * 64), capacity: 64 }
    const recordCoeffs = new Float64Array(COEFFICIENT_ARRAYS * 2).fill(0.1)
    wasm.sweep(2, 1, 0.01, recordCoeffs, new Float64Array(OUTPUT_ARRAYS * 2), list)
    expect(wasm.loadedRecord).toBe(record)
    const after = histories(wasm, 3)
    expect(bytes(after.whole)).toEqual(bytes(before.whole))
    expect(after.end).toEqual(before.end)
  })

  it('takes every sub-step count the engine uses, and refuses components of different lengths', () => {
    expect(MAX_SUB_STEPS).toBeLessThanOrEqual(HISTORY_BLOCK)
    for (const kernel of [createWasmKernel()!, createJsKernel()]) {
      expect(() => kernel.pairHistories(first, second.subarray(1), 1, coeffs, () => {})).toThrow(RangeError)
      expect(() => kernel.pairHistories(first, second, HISTORY_BLOCK + 1, coeffs, () => {})).toThrow(
        RangeError,
      )
    }
  })
})

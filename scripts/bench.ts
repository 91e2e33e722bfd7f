/**
 * `npm run bench`: speed of the spectrum engine. A benchmark, not a test.
 *
 * 1. Kernel, long periods (200 periods from 1 to 10 s, ζ = 5%, no sub-steps) on the
 *    standard 8,001-point record: ns per oscillator-step for the WebAssembly SIMD and
 *    JavaScript kernels, and for a vectorised C build of the same sweep when gcc is
 *    present, with 128-bit SSE2 vectors (as WebAssembly SIMD) and with the machine's
 *    widest (-march=native) (best of 7 runs each, after warm-up).
 * 2. The standard job: the bundled synthetic far-field record (8,001 points at
 *    Δt = 0.005 s), the default period grid (301 periods, 0.01–10 s), damping 0.02,
 *    0.05, 0.10 and 0.20, the default method (newmark-average): total time (median of
 *    5 runs after warm-up) and ns per oscillator-step, both kernels.
 */
import { execFileSync } from 'node:child_process'
import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { computeSpectrum } from '../shared/spectra/computeSpectrum.js'
import { demoRecord } from '../shared/spectra/demo/demoRecords.js'
import {
  COEFFICIENT_ARRAYS,
  OUTPUT_ARRAYS,
  type SweepKernel,
  jsKernel,
  wasmKernel,
} from '../shared/spectra/kernel/sweepKernel.js'
import { recurrenceCoefficients } from '../shared/spectra/oscillatorRecurrence.js'
import { parseRecord } from '../shared/spectra/parseRecord.js'
import { defaultPeriodsS, logPeriodGrid } from '../shared/spectra/periods.js'

const record = parseRecord(demoRecord('synthetic-far-field').text)
const samples = record.points

function timeMs(run: () => void): number {
  const start = performance.now()
  run()
  return performance.now() - start
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!

/** Coefficients of 200 oscillators from 1 to 10 s at ζ = 5%, one step per sample. */
function longPeriodCoefficients(): { count: number; coeffs: Float64Array } {
  const periods = logPeriodGrid(1, 10, 200)
  const count = periods.length
  const coeffs = new Float64Array(COEFFICIENT_ARRAYS * count)
  periods.forEach((periodS, o) => {
    const omega = (2 * Math.PI) / periodS
    const c = recurrenceCoefficients('newmark-average', omega, 0.05, record.dtS)
    const values = [c.a11, c.a12, c.b1, c.c1, c.a21, c.a22, c.b2, c.c2, 0.1 * omega, omega * omega]
    values.forEach((value, q) => (coeffs[q * count + o] = value))
  })
  return { count, coeffs }
}

function kernelNsPerStep(
  kernel: SweepKernel,
  count: number,
  coeffs: Float64Array,
): { ns: number; firstPeak: number } {
  const out = new Float64Array(OUTPUT_ARRAYS * count)
  kernel.loadRecord(record.accelMPerS2)
  for (let i = 0; i < 3; i++) kernel.sweep(count, 1, coeffs, out)
  const times = Array.from({ length: 7 }, () => timeMs(() => kernel.sweep(count, 1, coeffs, out)))
  return { ns: (Math.min(...times) * 1e6) / (count * (samples - 1)), firstPeak: out[0]! }
}

/** The C reference built with extra gcc flags (none: SSE2, 128-bit vectors like WebAssembly SIMD). */
function cReference(
  count: number,
  coeffs: Float64Array,
  flags: string[],
): { ns: number; firstPeak: number } | string {
  const source = fileURLToPath(new URL('./benchSweepKernel.c', import.meta.url))
  const dir = mkdtempSync(join(tmpdir(), 'ordinate-bench-'))
  const binary = join(dir, 'sweep')
  try {
    execFileSync('gcc', ['-O3', ...flags, '-ffp-contract=off', '-o', binary, source, '-lm'], {
      stdio: 'pipe',
    })
  } catch {
    return 'skipped (gcc not available)'
  }
  const input = Buffer.alloc(8 + 8 * (samples + coeffs.length))
  input.writeInt32LE(samples, 0)
  input.writeInt32LE(count, 4)
  Buffer.from(record.accelMPerS2.buffer, record.accelMPerS2.byteOffset, samples * 8).copy(input, 8)
  Buffer.from(coeffs.buffer, coeffs.byteOffset, coeffs.byteLength).copy(input, 8 + 8 * samples)
  const inputPath = join(dir, 'input.bin')
  writeFileSync(inputPath, input)
  const [ns, peak] = execFileSync(binary, [inputPath], { encoding: 'utf8' }).trim().split(' ').map(Number)
  return { ns: ns!, firstPeak: peak! }
}

function standardJob(kernel: 'wasm-simd' | 'js'): { totalMs: number; steps: number; subSteps: string } {
  const settings = {
    dampingRatios: [0.02, 0.05, 0.1, 0.2],
    periodsS: defaultPeriodsS(),
    method: 'newmark-average' as const,
    kernel,
  }
  const job = { accelMPerS2: record.accelMPerS2, dtS: record.dtS }
  let result = computeSpectrum(job, settings)
  const times = Array.from({ length: 5 }, () => timeMs(() => (result = computeSpectrum(job, settings))))
  const { subStepsMin, subStepsMax } = result.methodStatement
  return { totalMs: median(times), steps: result.oscillatorSteps, subSteps: `${subStepsMin}–${subStepsMax}` }
}

const { count, coeffs } = longPeriodCoefficients()
const wasm = wasmKernel()
const rows: string[] = []
console.log(
  `Ordinate spectrum engine benchmark (Node ${process.version}, ${samples}-point record at Δt = ${record.dtS} s)`,
)
console.log('')
console.log(`1. Kernel, long periods (${count} periods 1–10 s, ζ = 5%, no sub-steps), best of 7:`)
if (wasm) {
  const timing = kernelNsPerStep(wasm, count, coeffs)
  rows.push(`   WebAssembly SIMD           ${timing.ns.toFixed(2)} ns per oscillator-step`)
}
const js = kernelNsPerStep(jsKernel(), count, coeffs)
rows.push(`   JavaScript                 ${js.ns.toFixed(2)} ns per oscillator-step`)
for (const [label, flags] of [
  ['C, gcc -O3 (SSE2)        ', []],
  ['C, gcc -O3 -march=native ', ['-march=native']],
] as const) {
  const c = cReference(count, coeffs, [...flags])
  if (typeof c === 'string') rows.push(`   ${label} ${c}`)
  else {
    const same = c.firstPeak === js.firstPeak ? 'same bits as the kernels' : 'differs from the kernels'
    rows.push(`   ${label} ${c.ns.toFixed(2)} ns per oscillator-step (vectorised reference, ${same})`)
  }
}
rows.forEach((row) => console.log(row))
console.log('')
console.log('2. Standard job (301 periods × damping 0.02, 0.05, 0.10, 0.20, newmark-average), median of 5:')
for (const kernel of wasm ? (['wasm-simd', 'js'] as const) : (['js'] as const)) {
  const job = standardJob(kernel)
  console.log(
    `   ${kernel.padEnd(10)} ${job.totalMs.toFixed(0).padStart(6)} ms total, ${(job.steps / 1e6).toFixed(1)} M oscillator-steps (sub-steps ${job.subSteps}), ${((job.totalMs * 1e6) / job.steps).toFixed(2)} ns per oscillator-step overall`,
  )
}

/**
 * `npm run bench:processing`: time of record processing on one core. A benchmark, not a test.
 *
 * Records: the bundled synthetic far-field demo record (8,001 points at Δt = 0.005 s), and a
 * 1,988,000-point record made by repeating it end to end (synthetic, not a recording), which
 * with its pads (30 s = 6,000 samples at each end) is filtered as 2,000,000 points, the most
 * Ordinate allows. Settings: baseline order 1, a zero-phase Butterworth high-pass at 0.1 Hz of
 * order 4 and a low-pass at 25 Hz of order 4, pads kept. Prints the median of `--runs` (default
 * 5) runs of processRecord, and of the Fourier spectrum (FFT plus Konno–Ohmachi smoothing at 200
 * frequencies) of each result. The target: processing 2,000,000 points in ≤ 1 s.
 * Run it on an idle machine; under load the medians are what to quote.
 */
import { demoRecord } from '../shared/spectra/demo/demoRecords.js'
import { parseRecord } from '../shared/spectra/parseRecord.js'
import { fourierSpectrum } from '../shared/spectra/processing/fourierSpectrum.js'
import { processRecord, type ProcessingSettings } from '../shared/spectra/processing/processRecord.js'

const runsArg = process.argv.indexOf('--runs')
const runs = runsArg > 0 ? Math.max(1, Number(process.argv[runsArg + 1])) : 5

const far = parseRecord(demoRecord('synthetic-far-field').text)
const long = new Float64Array(2_000_000 - 2 * 6000)
for (let i = 0; i < long.length; i++) long[i] = far.accelMPerS2[i % far.accelMPerS2.length]!

const settings: ProcessingSettings = {
  baseline: { order: 1 },
  highPass: { hz: 0.1, order: 4 },
  lowPass: { hz: 25, order: 4 },
  phase: 'zero',
}

function median(times: number[]): number {
  const s = [...times].sort((a, b) => a - b)
  return s[Math.floor(s.length / 2)]!
}

function time(fn: () => void): number {
  const t0 = performance.now()
  fn()
  return performance.now() - t0
}

for (const [label, accel, pads] of [
  ['8,001 points', far.accelMPerS2, 'keep'],
  ['2,000,000 points with pads', long, 'keep'],
] as const) {
  const s = { ...settings, pads }
  const processing: number[] = []
  const fourier: number[] = []
  let out = processRecord(accel, far.dtS, s).accelMPerS2 // warm-up
  for (let r = 0; r < runs; r++) {
    processing.push(time(() => (out = processRecord(accel, far.dtS, s).accelMPerS2)))
    fourier.push(time(() => fourierSpectrum(out, far.dtS)))
  }
  const fmt = (ms: number) => `${ms.toFixed(1)} ms`
  console.log(
    `${label} (Δt = ${far.dtS} s, baseline 1, high-pass 0.1 Hz/4 and low-pass 25 Hz/4, zero phase, pads ${pads}, result ${out.length.toLocaleString('en')} points):`,
  )
  console.log(
    `  processRecord: median ${fmt(median(processing))} of ${runs} (${processing.map(fmt).join(', ')})`,
  )
  console.log(
    `  Fourier spectrum: median ${fmt(median(fourier))} of ${runs} (${fourier.map(fmt).join(', ')})`,
  )
}

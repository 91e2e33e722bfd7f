/**
 * `npm run bench:pair`: speed of the two-component (record pair) engine. A benchmark, not a test.
 *
 * The standard job on a synthetic pair: component 1 is the bundled synthetic far-field demo record
 * (8,001 points at Δt = 0.005 s); component 2 is the same record time-reversed (synthetic, a
 * decorrelated companion of the same length, not a recording). Default period grid (301 periods,
 * 0.01–10 s), damping 0.02, 0.05, 0.10 and 0.20, newmark-average, combinations geomean, rotd50 and
 * rotd100.
 *
 * Prints:
 * 1. the whole computeRotDSpectrum call (best of `--runs`, default 2; no separate warm-up run, the
 *    job is long enough to warm itself up), its oscillator-steps and ns per oscillator-step;
 * 2. where the time goes, from a replay of the first pass with the engine's parts: the two
 *    components' response histories (u, v and absolute acceleration) a block at a time into reused
 *    buffers (pairHistories), then the directional peak search (DirectionalPeaks.addMany) on them.
 */
import { planSpectrum } from '../shared/spectra/computeSpectrum.js'
import { demoRecord } from '../shared/spectra/demo/demoRecords.js'
import { parseRecord } from '../shared/spectra/parseRecord.js'
import { defaultPeriodsS } from '../shared/spectra/periods.js'
import { DirectionalPeaks, computeRotDSpectrum, historyBlock, pairHistories } from '../shared/spectra/rotd.js'
import { COMBINATIONS } from '../shared/vocabulary/combinations.js'

const runsArg = process.argv.indexOf('--runs')
const runs = runsArg > 0 ? Math.max(1, Number(process.argv[runsArg + 1])) : 2

const far = parseRecord(demoRecord('synthetic-far-field').text)
const accel1 = far.accelMPerS2
const accel2 = Float64Array.from(accel1).reverse()
const dtS = far.dtS
const settings = {
  dampingRatios: [0.02, 0.05, 0.1, 0.2],
  periodsS: defaultPeriodsS(),
  method: 'newmark-average' as const,
  combinations: [...COMBINATIONS],
}
const record = { accel1MPerS2: accel1, accel2MPerS2: accel2, dtS }

console.log(
  `Ordinate pair engine benchmark (Node ${process.version}): synthetic pair, far-field demo record and its time reversal, ${accel1.length} points at Δt = ${dtS} s`,
)
console.log(
  `Standard job: ${settings.periodsS.length} periods × damping ${settings.dampingRatios.join(', ')}, ${settings.method}, ${settings.combinations.join(' + ')}`,
)
console.log('')

const times: number[] = []
let result: ReturnType<typeof computeRotDSpectrum> | undefined
for (let r = 0; r < runs; r++) {
  const start = performance.now()
  result = computeRotDSpectrum(record, settings)
  times.push(performance.now() - start)
}
const best = Math.min(...times)
const steps = result!.oscillatorSteps
const { subStepsMin, subStepsMax } = result!.methodStatement
console.log(
  `1. computeRotDSpectrum, best of ${runs}: ${best.toFixed(0)} ms (runs: ${times.map((t) => t.toFixed(0)).join(', ')} ms)`,
)
console.log(
  `   ${(steps / 1e6).toFixed(1)} M oscillator-steps (both components, sub-steps ${subStepsMin}–${subStepsMax}), ${((best * 1e6) / steps).toFixed(2)} ns per oscillator-step`,
)
const rotd100 = result!.curves.find((c) => c.dampingRatio === 0.05 && c.combination === 'rotd100')!
const rotd50 = result!.curves.find((c) => c.dampingRatio === 0.05 && c.combination === 'rotd50')!
const at1s = settings.periodsS.findIndex((p) => p >= 1)
console.log(
  `   check: ζ = 5%, T = ${settings.periodsS[at1s]!.toFixed(3)} s: RotD50 PSA ${rotd50.psaMPerS2[at1s]!.toPrecision(9)}, RotD100 PSA ${rotd100.psaMPerS2[at1s]!.toPrecision(9)} m/s²`,
)
console.log('')

/** Replay of the first pass: the engine's history blocks, timing the peak search apart. */
const block = historyBlock()
const trackers = [new DirectionalPeaks(), new DirectionalPeaks(), new DirectionalPeaks()] as const
const plan = planSpectrum(accel1.length, dtS, settings)
let totalMs = 0
let searchMs = 0
let replaySteps = 0
const periods = settings.periodsS.length
for (let index = 0; index < plan.subSteps.length; index++) {
  const periodS = settings.periodsS[index % periods]!
  const zeta = settings.dampingRatios[Math.floor(index / periods)]!
  for (const t of trackers) t.reset()
  const start = performance.now()
  pairHistories(record, settings.method, periodS, zeta, plan.subSteps[index]!, block, (count) => {
    const t0 = performance.now()
    trackers[0].addMany(block.u1, block.u2, count)
    trackers[1].addMany(block.v1, block.v2, count)
    trackers[2].addMany(block.a1, block.a2, count)
    searchMs += performance.now() - t0
    replaySteps += 2 * count
  })
  totalMs += performance.now() - start
}
const historyMs = totalMs - searchMs
console.log('2. Where the time goes (replay of the first pass):')
console.log(
  `   response histories, both components: ${historyMs.toFixed(0)} ms for ${(replaySteps / 1e6).toFixed(1)} M oscillator-steps (${((historyMs * 1e6) / replaySteps).toFixed(2)} ns each)`,
)
console.log(
  `   directional peak search (u, v, A):   ${searchMs.toFixed(0)} ms (${((searchMs * 1e6) / (replaySteps / 2)).toFixed(2)} ns per time step of the pair)`,
)

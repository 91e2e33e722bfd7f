/**
 * `npm run bench:pair`: speed of the two-component (record pair) engine against the single-record
 * engine on the same machine in the same run. A benchmark, not a test.
 *
 * The standard job on a synthetic pair: component 1 is the bundled synthetic far-field demo record
 * (8,001 points at Δt = 0.005 s); component 2 is the same record time-reversed (synthetic, a
 * decorrelated companion of the same length, not a recording). Default period grid (301 periods,
 * 0.01–10 s), damping 0.02, 0.05, 0.10 and 0.20, newmark-average, combinations geomean, rotd50 and
 * rotd100. The single-record standard job is the same settings on component 1 alone.
 *
 * Prints:
 * 1. each job's times over `--runs` (default 3) alternating runs, their medians, and the ratio of
 *    the medians (the target: pair ≤ 3× record); the machine may be shared, so medians and
 *    ratios are what to quote, and the same for the process's CPU time, which load disturbs less;
 * 2. where the pair's time goes, in its first pass: the engine's own solve (solvePairOscillators:
 *    in period order, two at a time where neighbours share their sub-steps, each started from three
 *    quarters of the directional peaks of the last one solved, and the kernel leaving out the
 *    samples inside each tracker's floor circle); the same pass with every oscillator from 0, one
 *    at a time, and every sample handed to the search (DirectionalPeaks.addMany); the histories
 *    alone on each kernel, one at a time and two at a time; then the CPU time of the search and
 *    the rest in both ways, less that of the histories two at a time (CPU time is less disturbed
 *    by a shared machine).
 */
import { computeSpectrum, planSpectrum } from '../shared/spectra/computeSpectrum.js'
import { demoRecord } from '../shared/spectra/demo/demoRecords.js'
import { parseRecord } from '../shared/spectra/parseRecord.js'
import { defaultPeriodsS } from '../shared/spectra/periods.js'
import {
  type HistoryFold,
  PAIR_COEFFICIENTS,
  type SweepKernel,
  defaultKernel,
  jsKernel,
} from '../shared/spectra/kernel/sweepKernel.js'
import { DirectionalPeaks, pairCoefficients, solvePairOscillators } from '../shared/spectra/rotd.js'
import { COMBINATIONS } from '../shared/vocabulary/combinations.js'

const runsArg = process.argv.indexOf('--runs')
const runs = runsArg > 0 ? Math.max(1, Number(process.argv[runsArg + 1])) : 3

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
const pair = { accel1MPerS2: accel1, accel2MPerS2: accel2, dtS }
const single = { accelMPerS2: accel1, dtS }

console.log(
  `Ordinate pair engine benchmark (Node ${process.version}): synthetic pair, far-field demo record and its time reversal, ${accel1.length} points at Δt = ${dtS} s`,
)
console.log(
  `Standard job: ${settings.periodsS.length} periods × damping ${settings.dampingRatios.join(', ')}, ${settings.method}; pair: ${settings.combinations.join(' + ')}`,
)
console.log('')

const median = (values: number[]) => {
  const sorted = [...values].sort((a, b) => a - b)
  const mid = Math.floor(sorted.length / 2)
  return sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2
}
/** The result, the wall time and the process's CPU time (user + system) of `run`, in ms. */
const timed = <T>(run: () => T): [T, number, number] => {
  const start = performance.now()
  const cpu = process.cpuUsage()
  const result = run()
  const used = process.cpuUsage(cpu)
  return [result, performance.now() - start, (used.user + used.system) / 1000]
}

const recordTimes: number[] = []
const pairTimes: number[] = []
const recordCpu: number[] = []
const pairCpu: number[] = []
let recordResult: ReturnType<typeof computeSpectrum> | undefined
let pairResult: ReturnType<typeof computeSpectrum> | undefined
for (let r = 0; r < runs; r++) {
  const [recordRun, recordMs, recordCpuMs] = timed(() => computeSpectrum(single, settings))
  const [pairRun, pairMs, pairCpuMs] = timed(() => computeSpectrum(pair, settings))
  recordCpu.push(recordCpuMs)
  pairCpu.push(pairCpuMs)
  recordResult = recordRun
  pairResult = pairRun
  recordTimes.push(recordMs)
  pairTimes.push(pairMs)
}
const list = (times: number[]) => times.map((t) => t.toFixed(0)).join(', ')
const describe = (result: ReturnType<typeof computeSpectrum>, ms: number) =>
  `${(result.oscillatorSteps / 1e6).toFixed(1)} M oscillator-steps (sub-steps ${result.methodStatement.subStepsMin}–${result.methodStatement.subStepsMax}, kernel ${result.methodStatement.kernel}), ${((ms * 1e6) / result.oscillatorSteps).toFixed(2)} ns per oscillator-step`
const recordMedian = median(recordTimes)
const pairMedian = median(pairTimes)
console.log(`1. Standard jobs, ${runs} alternating runs:`)
console.log(`   record: median ${recordMedian.toFixed(0)} ms (runs: ${list(recordTimes)} ms)`)
console.log(`           ${describe(recordResult!, recordMedian)}`)
console.log(`   pair:   median ${pairMedian.toFixed(0)} ms (runs: ${list(pairTimes)} ms)`)
console.log(`           ${describe(pairResult!, pairMedian)}`)
console.log(
  `   pair / record: ${(pairMedian / recordMedian).toFixed(2)}× (medians; per run ${pairTimes.map((t, i) => (t / recordTimes[i]!).toFixed(2)).join(', ')}; target ≤ 3×)`,
)
// CPU time is less disturbed than wall time when other work shares the cores.
console.log(
  `   CPU time: record median ${median(recordCpu).toFixed(0)} ms, pair median ${median(pairCpu).toFixed(0)} ms, pair / record ${(median(pairCpu) / median(recordCpu)).toFixed(2)}× (per run ${pairCpu.map((t, i) => (t / recordCpu[i]!).toFixed(2)).join(', ')})`,
)
const at1s = settings.periodsS.findIndex((p) => p >= 1)
const curve = (combination: string) =>
  pairResult!.curves.find((c) => c.dampingRatio === 0.05 && c.combination === combination)!
console.log(
  `   check: ζ = 5%, T = ${settings.periodsS[at1s]!.toFixed(3)} s: RotD50 PSA ${curve('rotd50').psaMPerS2[at1s]!.toPrecision(9)}, RotD100 PSA ${curve('rotd100').psaMPerS2[at1s]!.toPrecision(9)} m/s²`,
)
console.log('')

/** The pair's first pass, in the engine's way and in the plain way, timing the directional search apart. */
const trackers = [new DirectionalPeaks(), new DirectionalPeaks(), new DirectionalPeaks()] as const
const plan = planSpectrum(accel1.length, dtS, settings, 'step-ends')
const periods = settings.periodsS.length
const oscillators = Array.from(plan.subSteps, (subSteps, index) => ({
  periodS: settings.periodsS[index % periods]!,
  dampingRatio: settings.dampingRatios[Math.floor(index / periods)]!,
  subSteps,
}))
const firstPassSteps = oscillators.reduce((total, o) => total + 2 * (accel1.length - 1) * o.subSteps, 0)
const coeffs = new Float64Array(PAIR_COEFFICIENTS)
/** The wall and CPU ms of `run`. */
const clock = (run: () => void): [number, number] => {
  const start = performance.now()
  const cpu = process.cpuUsage()
  run()
  const used = process.cpuUsage(cpu)
  return [performance.now() - start, (used.user + used.system) / 1000]
}
/** Every oscillator from 0 in the plan's order, every sample handed to `fold`. */
const replay = (kernel: SweepKernel, fold: HistoryFold) =>
  clock(() => {
    oscillators.forEach(({ periodS, dampingRatio, subSteps }) => {
      for (const t of trackers) t.reset()
      pairCoefficients(settings.method, periodS, dampingRatio, dtS / subSteps, coeffs)
      kernel.pairHistories(accel1, accel2, subSteps, coeffs, fold)
    })
  })
const engineKernel = defaultKernel()
const [engineMs, engineCpuMs] = clock(() =>
  solvePairOscillators(pair, oscillators, settings.method, engineKernel),
)
const [plainMs, plainCpuMs] = replay(engineKernel, (block, count) => {
  trackers[0].addMany(block.u1, block.u2, count)
  trackers[1].addMany(block.v1, block.v2, count)
  trackers[2].addMany(block.a1, block.a2, count)
})
const perStep = (ms: number) => ((ms * 1e6) / firstPassSteps).toFixed(2)
console.log(
  `2. Where the pair time goes (its first pass: ${oscillators.length} oscillators, ${(firstPassSteps / 1e6).toFixed(1)} M oscillator-steps, kernel ${engineKernel.name}):`,
)
console.log(
  `   the engine's solve (in period order, two at a time where neighbours share their sub-steps, each started from three quarters of the directional peaks of the last one solved; samples inside each floor circle left out by the kernel): ${engineMs.toFixed(0)} ms, CPU ${engineCpuMs.toFixed(0)} ms`,
)
console.log(
  `   the same with every oscillator from 0 and every sample searched: ${plainMs.toFixed(0)} ms, CPU ${plainCpuMs.toFixed(0)} ms`,
)
const noFold: HistoryFold = () => {}
/** The histories alone as the engine runs them: neighbours in the plan's order with equal sub-steps two at a time. */
const replayTwo = (kernel: SweepKernel) =>
  clock(() => {
    const lanes = [new Float64Array(PAIR_COEFFICIENTS), new Float64Array(PAIR_COEFFICIENTS)] as const
    for (let at = 0; at < oscillators.length;) {
      const one = oscillators[at]!
      const other = oscillators[at + 1]
      pairCoefficients(settings.method, one.periodS, one.dampingRatio, dtS / one.subSteps, lanes[0])
      if (other && other.subSteps === one.subSteps && other.dampingRatio === one.dampingRatio) {
        pairCoefficients(settings.method, other.periodS, other.dampingRatio, dtS / other.subSteps, lanes[1])
        kernel.pairHistoriesTwo(
          accel1,
          accel2,
          one.subSteps,
          { coeffs: lanes[0], fold: noFold },
          { coeffs: lanes[1], fold: noFold },
        )
        at += 2
      } else {
        kernel.pairHistories(accel1, accel2, one.subSteps, lanes[0], noFold)
        at += 1
      }
    }
  })
let oneCpuMs = 0
let twoCpuMs = 0
for (const kernel of new Set([engineKernel, jsKernel()])) {
  const [ms, oneCpu] = replay(kernel, noFold)
  const [twoMs, twoCpu] = replayTwo(kernel)
  if (kernel === engineKernel) {
    oneCpuMs = oneCpu
    twoCpuMs = twoCpu
  }
  console.log(
    `   histories alone (every sample stored), kernel ${kernel.name}: one oscillator at a time ${ms.toFixed(0)} ms (${perStep(ms)} ns per oscillator-step), two at a time as the engine runs them ${twoMs.toFixed(0)} ms (${perStep(twoMs)} ns)`,
  )
}
// CPU time, less disturbed by other work on the machine than the wall times above.
const searchMs = plainCpuMs - oneCpuMs
console.log(
  `   CPU time: the plain pass's directional search (its CPU time less the histories one at a time) ${searchMs.toFixed(0)} ms, ${((searchMs * 1e6) / (firstPassSteps / 2)).toFixed(2)} ns per time step of the pair; the engine's whole first pass ${engineCpuMs.toFixed(0)} ms, ${(engineCpuMs / twoCpuMs).toFixed(2)}× the histories alone two at a time (its kernel stores only the samples it keeps, so its search cannot be split off this way)`,
)

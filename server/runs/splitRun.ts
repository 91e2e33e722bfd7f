import type { SpectrumJob, WorkerReply } from '../../shared/schemas/spectrumWorker.js'
import { planSpectrum } from '../../shared/spectra/computeSpectrum.js'
import { mergeSpectrumWarnings } from '../../shared/spectra/warnings.js'
import type { RunSettings } from '../../shared/schemas/runs.js'

type RecordResult = Extract<WorkerReply, { type: 'result' }>

/**
 * Below this many planned oscillator-steps a run is not split: the work is a few milliseconds
 * and the second thread's message round trip would eat the gain.
 */
export const MIN_SPLIT_STEPS = 5_000_000

/** One part of a run: a contiguous range of the run's periods, and its share of the planned work. */
export interface RunPart {
  periodsS: number[]
  weight: number
}

/**
 * Splits a single-record run into at most `parts` contiguous period ranges of about equal planned
 * work (planSpectrum's sub-steps, plus the exact check of each Newmark oscillator, summed over the
 * damping ratios). Each oscillator's
 * sub-steps and peaks depend only on its own period, damping, Δt, duration and method
 * (shared/spectra/computeSpectrum.ts), so the parts computed apart and put back in period order
 * give the same bits as the whole run. Answers one part (the whole run) when splitting cannot
 * give that result exactly or is not worth it:
 * - record pairs (their combinations are computed across components);
 * - runs too small to gain (MIN_SPLIT_STEPS);
 * - runs with oscillators at the sub-step cap (their warning counts them over the whole sweep);
 * - runs whose periods shorter than 2Δt would fall in more than the first part (the same).
 */
export function planRunParts(
  job: SpectrumJob,
  settings: Pick<RunSettings, 'method' | 'dampingRatios' | 'periodsS'>,
  parts: number,
): RunPart[] {
  const whole = [{ periodsS: settings.periodsS, weight: 1 }]
  const periods = settings.periodsS.length
  const count = Math.min(parts, periods)
  if (count < 2 || job.kind !== 'record') return whole
  const points = job.samples.byteLength / Float64Array.BYTES_PER_ELEMENT
  let plan: ReturnType<typeof planSpectrum>
  try {
    plan = planSpectrum(points, job.dtS, settings)
  } catch {
    return whole // settings the engine refuses: the worker reports the engine's message
  }
  if (plan.oscillatorSteps < MIN_SPLIT_STEPS || plan.capped.length > 0) return whole

  // A Newmark oscillator also runs once on the exact recurrence, one step per sample (its check,
  // computeSpectrum.ts): at long periods, where m is 1 or 2, that doubles its work.
  const cost = settings.periodsS.map((_, p) =>
    settings.dampingRatios.reduce((sum, _z, d) => {
      const index = d * periods + p
      return sum + plan.subSteps[index]! + (plan.recurrences[index] === 'piecewise-exact' ? 0 : 1)
    }, 0),
  )
  const total = cost.reduce((a, b) => a + b, 0)
  const ends: number[] = []
  let cumulative = 0
  for (let p = 0; p < periods && ends.length < count - 1; p++) {
    const before = cumulative
    cumulative += cost[p]!
    const target = (total * (ends.length + 1)) / count
    if (cumulative < target) continue
    // End the part before or after this period, whichever lands nearer the target.
    const end = target - before < cumulative - target ? p : p + 1
    const start = ends.at(-1) ?? 0
    ends.push(Math.min(Math.max(end, start + 1), periods - (count - 1 - ends.length)))
  }
  ends.push(periods)
  if (ends.length !== count) return whole

  const firstEnd = ends[0]!
  const shortPeriod = 2 * job.dtS
  if (settings.periodsS.some((periodS, p) => periodS < shortPeriod && p >= firstEnd)) return whole

  let start = 0
  return ends.map((end) => {
    const part = {
      periodsS: settings.periodsS.slice(start, end),
      weight: cost.slice(start, end).reduce((a, b) => a + b, 0) / total,
    }
    start = end
    return part
  })
}

function concat(series: Float64Array[]): Float64Array {
  const out = new Float64Array(series.reduce((n, s) => n + s.length, 0))
  let at = 0
  for (const s of series) {
    out.set(s, at)
    at += s.length
  }
  return out
}

/**
 * Puts the parts' results (in period order) back into the result of the whole run: series
 * concatenated per damping ratio, the sub-step range widened, the work and the warnings summed.
 * Answers undefined when a part's warnings count oscillators of its own part only (the sub-step
 * cap reached during refinement): the whole run must then be computed in one piece.
 */
export function mergeRunParts(replies: RecordResult[]): RecordResult | undefined {
  const [first] = replies
  if (!first) return undefined
  if (replies.length === 1) return first
  const computations = replies.map((r) => r.computation)
  const capped = (code: string) => code === 'sub-step-cap' || code === 'peak-bound-above-budget'
  if (computations.some((c) => c.warnings.some((warning) => capped(warning.code)))) return undefined
  const warnings = mergeSpectrumWarnings(computations.map((c) => c.warnings))
  const statement = first.computation.methodStatement
  return {
    type: 'result',
    runId: first.runId,
    computation: {
      periodsS: concat(computations.map((c) => c.periodsS)),
      curves: first.computation.curves.map((curve, d) => {
        const pick = (key: Exclude<keyof typeof curve, 'dampingRatio' | 'combination'>) =>
          concat(computations.map((c) => c.curves[d]![key] ?? new Float64Array(0)))
        return {
          dampingRatio: curve.dampingRatio,
          sdM: pick('sdM'),
          svMPerS: pick('svMPerS'),
          saMPerS2: pick('saMPerS2'),
          psvMPerS: pick('psvMPerS'),
          psaMPerS2: pick('psaMPerS2'),
          sdTimeS: pick('sdTimeS'),
          saTimeS: pick('saTimeS'),
        }
      }),
      methodStatement: {
        ...statement,
        subStepsMin: Math.min(...computations.map((c) => c.methodStatement.subStepsMin)),
        subStepsMax: Math.max(...computations.map((c) => c.methodStatement.subStepsMax)),
      },
      warnings,
      oscillatorSteps: computations.reduce((n, c) => n + c.oscillatorSteps, 0),
    },
    // The parts ran side by side: the run's computing time is the longest part's.
    computeMs: Math.max(...replies.map((r) => r.computeMs)),
  }
}

import { MAX_RECORD_POINTS } from '../parseRecord.js'
import { butterworthSos, MAX_FILTER_ORDER, MIN_FILTER_ORDER, type SosFilter } from './butterworthSos.js'
import { cosineTaperInPlace } from './cosineTaper.js'
import { MAX_BASELINE_ORDER, removeBaselineInPlace } from './removeBaseline.js'
import { sosFilterInPlace, sosFilterZeroPhaseInPlace } from './sosFilter.js'

export interface FilterSettings {
  hz: number
  order: number
}

/** The processing asked for; every step optional. Same meaning as the API body. */
export interface ProcessingSettings {
  baseline?: { order: number } | null
  taperS?: number | null
  highPass?: FilterSettings | null
  lowPass?: FilterSettings | null
  phase?: 'zero' | 'causal'
  pads?: 'keep' | 'trim'
}

/** The processing as applied: defaults filled in, and the pad each end actually added. */
export interface AppliedProcessing {
  baseline: { order: number } | null
  taperS: number | null
  highPass: FilterSettings | null
  lowPass: FilterSettings | null
  phase: 'zero' | 'causal'
  /** null when no pads were added (no filter, or a causal one). */
  pads: 'keep' | 'trim' | null
  /** Zero pad added at each end before filtering, s (whole samples). */
  padS: number
}

export interface ProcessingIssue {
  path: string[]
  message: string
}

export interface ProcessedRecord {
  accelMPerS2: Float64Array
  applied: AppliedProcessing
  /** Samples of zero pad added at each end (kept in accelMPerS2 when pads are kept). */
  padSamples: number
  /** Time of the first stored sample, s: −padS when the pads are kept, else 0. */
  startTimeS: number
  /** 1/(1.25·f_hp), s; null without a high-pass (common practice, no single source). */
  usablePeriodMaxS: number | null
  warnings: string[]
}

/** Ratio of the high-pass corner to the lowest usable frequency (common practice, no single source). */
export const USABLE_BAND_FACTOR = 1.25

/** The longest period to rely on after a high-pass at hz: 1/(1.25·hz). */
export function usablePeriodMaxS(highPassHz: number | null | undefined): number | null {
  return highPassHz ? 1 / (USABLE_BAND_FACTOR * highPassHz) : null
}

/**
 * Samples of zero pad at each end: 0.75·n/f_c seconds, the nearest whole number of samples,
 * half of the total T_zpad = 1.5·n/f_c (Converse & Brady 1992, as cited by Boore 2005, BSSA
 * 95(2)). n is the poles of one pass and f_c the high-pass corner, else the low-pass one.
 * Zero for no filter or a causal filter.
 */
export function padSamplesFor(settings: ProcessingSettings, dtS: number): number {
  if ((settings.phase ?? 'zero') !== 'zero') return 0
  const filter = settings.highPass ?? settings.lowPass
  if (!filter) return 0
  return Math.round((0.75 * filter.order) / filter.hz / dtS)
}

const orderIssue = (path: string[], order: number, lo: number, hi: number, what: string) =>
  Number.isInteger(order) && order >= lo && order <= hi
    ? []
    : [{ path, message: `${what} must be a whole number from ${lo} to ${hi}; got ${order}.` }]

/**
 * Everything wrong with the settings for a record of `points` samples at Δt = dtS, each naming
 * its field. Empty when the settings can be applied.
 */
export function processingIssues(
  settings: ProcessingSettings,
  points: number,
  dtS: number,
): ProcessingIssue[] {
  const issues: ProcessingIssue[] = []
  const nyquistHz = 1 / (2 * dtS)
  const nyq = `Nyquist, ${fmt(nyquistHz)} Hz for Δt = ${fmt(dtS)} s`
  if (settings.baseline)
    issues.push(
      ...orderIssue(
        ['baseline', 'order'],
        settings.baseline.order,
        0,
        MAX_BASELINE_ORDER,
        'The baseline order',
      ),
    )
  for (const key of ['highPass', 'lowPass'] as const) {
    const f = settings[key]
    if (!f) continue
    const label = key === 'highPass' ? 'high-pass' : 'low-pass'
    issues.push(
      ...orderIssue([key, 'order'], f.order, MIN_FILTER_ORDER, MAX_FILTER_ORDER, `The ${label} order`),
    )
    if (!(Number.isFinite(f.hz) && f.hz > 0))
      issues.push({ path: [key, 'hz'], message: `The ${label} corner must be a frequency above 0 Hz.` })
    else if (f.hz >= nyquistHz)
      issues.push({
        path: [key, 'hz'],
        message: `The ${label} corner ${fmt(f.hz)} Hz must be below ${nyq}.`,
      })
  }
  if (settings.highPass && settings.lowPass && settings.highPass.hz >= settings.lowPass.hz)
    issues.push({
      path: ['highPass', 'hz'],
      message: `The high-pass corner ${fmt(settings.highPass.hz)} Hz must be below the low-pass corner ${fmt(settings.lowPass.hz)} Hz.`,
    })
  const durationS = (points - 1) * dtS
  if (settings.taperS != null) {
    if (!(Number.isFinite(settings.taperS) && settings.taperS >= 0))
      issues.push({ path: ['taperS'], message: 'The taper must be zero or more seconds.' })
    else if (settings.taperS > durationS / 4)
      issues.push({
        path: ['taperS'],
        message: `The taper of ${fmt(settings.taperS)} s at each end is longer than a quarter of the record (${fmt(durationS / 4)} s).`,
      })
  }
  if (settings.pads !== undefined && settings.phase === 'causal')
    issues.push({
      path: ['pads'],
      message:
        'Pads belong to zero-phase filtering only; a causal filter runs forward once and takes no pads.',
    })
  if (issues.length === 0) {
    const pad = padSamplesFor(settings, dtS)
    const total = points + 2 * pad
    if (total > MAX_RECORD_POINTS) {
      const key = settings.highPass ? 'highPass' : 'lowPass'
      issues.push({
        path: [key, 'hz'],
        message: `With pads of ${fmt(pad * dtS)} s at each end the record would have ${total.toLocaleString('en')} points, more than ${MAX_RECORD_POINTS.toLocaleString('en')}; raise the corner or lower the order.`,
      })
    }
  }
  return issues
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString()
}

/** The settings with defaults filled in, as stored with a processed record. */
export function appliedProcessing(settings: ProcessingSettings, dtS: number): AppliedProcessing {
  const phase = settings.phase ?? 'zero'
  const pad = padSamplesFor(settings, dtS)
  return {
    baseline: settings.baseline ? { order: settings.baseline.order } : null,
    taperS: settings.taperS ? settings.taperS : null,
    highPass: settings.highPass ? { hz: settings.highPass.hz, order: settings.highPass.order } : null,
    lowPass: settings.lowPass ? { hz: settings.lowPass.hz, order: settings.lowPass.order } : null,
    phase,
    pads: pad > 0 ? (settings.pads ?? 'keep') : null,
    padS: pad * dtS,
  }
}

export const TRIMMED_PADS_WARNING =
  'The zero pads added for the zero-phase filter were removed after filtering. The filter transient lives in them: without the pads the filtered record is no longer consistent, and its displacement and long-period response are wrong (Boore 2005, BSSA 95(2)). Keep the pads unless the record must keep its original length.'

/** The filters of the settings, designed for Δt (high-pass first, as applied). */
export function designFilters(settings: ProcessingSettings, dtS: number): SosFilter[] {
  const filters: SosFilter[] = []
  if (settings.highPass)
    filters.push(butterworthSos('highpass', settings.highPass.order, settings.highPass.hz, dtS))
  if (settings.lowPass)
    filters.push(butterworthSos('lowpass', settings.lowPass.order, settings.lowPass.hz, dtS))
  return filters
}

/**
 * Processes an acceleration record (m/s², Δt = dtS), leaving the input untouched. Steps, each
 * optional, in this order:
 * 1. baseline: subtract a least-squares polynomial of order 0–3 in time;
 * 2. taper: cosine taper of taperS seconds at each end (m = round(taperS/Δt) samples);
 * 3. pads: for zero phase only, 0.75·n/f_c of zeros at each end (see padSamplesFor);
 * 4. high-pass Butterworth, then 5. low-pass Butterworth, each applied completely before the
 *    next; zero phase runs each forward then backward from rest, causal forward once;
 * then the pads are kept (default) or trimmed, with a warning.
 * Throws RangeError naming the first problem when processingIssues finds any.
 */
export function processRecord(
  accelMPerS2: Float64Array,
  dtS: number,
  settings: ProcessingSettings,
): ProcessedRecord {
  if (!(Number.isFinite(dtS) && dtS > 0)) throw new RangeError('dtS must be a positive number of seconds')
  if (accelMPerS2.length < 2) throw new RangeError('the record needs at least two samples')
  const issues = processingIssues(settings, accelMPerS2.length, dtS)
  if (issues.length > 0) throw new RangeError(`${issues[0]!.path.join('.')}: ${issues[0]!.message}`)

  const applied = appliedProcessing(settings, dtS)
  const n = accelMPerS2.length
  const pad = padSamplesFor(settings, dtS)
  const work = new Float64Array(n + 2 * pad)
  work.set(accelMPerS2, pad)
  const body = work.subarray(pad, pad + n)
  if (applied.baseline) removeBaselineInPlace(body, applied.baseline.order)
  if (applied.taperS) cosineTaperInPlace(body, Math.round(applied.taperS / dtS))
  for (const filter of designFilters(settings, dtS)) {
    if (applied.phase === 'zero') sosFilterZeroPhaseInPlace(filter, work)
    else sosFilterInPlace(filter, work)
  }
  const keep = applied.pads !== 'trim'
  const out = keep ? work : work.slice(pad, pad + n)
  return {
    accelMPerS2: out,
    applied,
    padSamples: pad,
    startTimeS: keep ? -pad * dtS : 0,
    usablePeriodMaxS: usablePeriodMaxS(applied.highPass?.hz),
    warnings: applied.pads === 'trim' ? [TRIMMED_PADS_WARNING] : [],
  }
}

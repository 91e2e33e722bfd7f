/**
 * The engine's cautions about a computation, as data: a code and the values the message needs.
 * shared/warningMessages.ts turns each into the one wording used by pages, sheets, CSV files and
 * the command line; code that acts on a warning reads its code, never its text.
 */

/** Periods shorter than 2Δt, the shortest a record resolves. */
export interface ShortPeriodsWarning {
  code: 'periods-below-two-dt'
  /** How many of the run's periods are shorter than 2Δt. */
  periods: number
  twoDtS: number
}

/** Damping above the range where the accuracy target is demonstrated. */
export interface DampingLimitWarning {
  code: 'damping-above-accuracy-limit'
  accuracyTarget: number
  dampingLimit: number
}

/** The first pass: the sub-step cap stopped the sub-step rule short for some oscillators. */
export interface SubStepCapWarning {
  code: 'sub-step-cap'
  oscillators: number
  maxSubSteps: number
  /** The rule's largest error estimate at the cap, as a fraction. */
  errorEstimate: number
}

/** Refinement: at the cap, or after the last pass, the bound on peaks between steps stayed above budget. */
export interface PeakBoundWarning {
  code: 'peak-bound-above-budget'
  oscillators: number
  maxSubSteps: number
  /** The budget for the bound on peaks between steps, as a fraction. */
  budget: number
}

export type SpectrumWarning = ShortPeriodsWarning | DampingLimitWarning | SubStepCapWarning | PeakBoundWarning
export type SpectrumWarningCode = SpectrumWarning['code']

export const SPECTRUM_WARNING_CODES = [
  'periods-below-two-dt',
  'damping-above-accuracy-limit',
  'sub-step-cap',
  'peak-bound-above-budget',
] as const satisfies readonly SpectrumWarningCode[]

/**
 * The warnings of one computation from the warnings of its parts, each part a range of the same
 * sweep's oscillators (a run split by period range): counts are added and the largest error
 * estimate kept, so the result is what the whole sweep would have warned.
 */
export function mergeSpectrumWarnings(parts: readonly (readonly SpectrumWarning[])[]): SpectrumWarning[] {
  const merged = new Map<SpectrumWarningCode, SpectrumWarning>()
  for (const warning of parts.flat()) {
    const seen = merged.get(warning.code)
    if (!seen) {
      merged.set(warning.code, { ...warning })
    } else if (seen.code === 'periods-below-two-dt' && warning.code === 'periods-below-two-dt') {
      seen.periods += warning.periods
    } else if (seen.code === 'sub-step-cap' && warning.code === 'sub-step-cap') {
      seen.oscillators += warning.oscillators
      seen.errorEstimate = Math.max(seen.errorEstimate, warning.errorEstimate)
    } else if (seen.code === 'peak-bound-above-budget' && warning.code === 'peak-bound-above-budget') {
      seen.oscillators += warning.oscillators
    }
  }
  return SPECTRUM_WARNING_CODES.flatMap((code) => merged.get(code) ?? [])
}

/**
 * The one wording of every engine warning (shared/spectra/warnings.ts), for pages, sheets, CSV
 * files and the command line. Warnings stored as prose by older versions are shown as stored.
 */
import type { SpectrumWarning } from './spectra/warnings.js'

const percent = (fraction: number, digits = 2) => `${(100 * fraction).toFixed(digits)}%`
const plural = (count: number, one: string, many: string) => (count === 1 ? one : many)

type Messages = { [C in SpectrumWarning['code']]: (warning: Extract<SpectrumWarning, { code: C }>) => string }

const MESSAGES: Messages = {
  'periods-below-two-dt': ({ periods, twoDtS }) =>
    `${periods} ${plural(periods, 'period is', 'periods are')} shorter than 2Δt = ${twoDtS} s, the shortest the ` +
    `record resolves; ordinates there follow the straight lines between samples.`,
  'damping-above-accuracy-limit': ({ accuracyTarget, dampingLimit }) =>
    `The ${100 * accuracyTarget}% accuracy target is demonstrated for damping up to ${100 * dampingLimit}%.`,
  'sub-step-cap': ({ oscillators, maxSubSteps, errorEstimate }) =>
    `For ${oscillators} ${plural(oscillators, 'oscillator', 'oscillators')} the cap of ${maxSubSteps} sub-steps ` +
    `stopped short of the accuracy rule (error estimate up to ${(100 * errorEstimate).toPrecision(2)}%).`,
  'peak-bound-above-budget': ({ oscillators, maxSubSteps, budget }) =>
    `For ${oscillators} ${plural(oscillators, 'oscillator', 'oscillators')} refinement (at most ${maxSubSteps} ` +
    `sub-steps) left the bound on peaks between steps above ${percent(budget)}.`,
}

/** The text of one warning. */
export function warningMessage(warning: SpectrumWarning): string {
  return (MESSAGES[warning.code] as (w: SpectrumWarning) => string)(warning)
}

/** The texts of a list of warnings, in order. */
export function warningMessages(warnings: readonly SpectrumWarning[]): string[] {
  return warnings.map(warningMessage)
}

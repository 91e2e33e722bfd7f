/**
 * How a record's peaks are found, per method, in one or two sentences for pages. The sheet and
 * the JSON method statement carry the full rule (computeSpectrum.ts recordSubStepRule), which
 * opens with the same sentences. Kept apart from the engine so pages can show it without it.
 */
import type { SpectrumMethod } from './oscillatorRecurrence.js'
import { ACCURACY_TARGET } from './subSteps.js'

const NEWMARK_SUMMARY =
  `Sub-steps only as many as the guarantee needs: every ordinate is checked against the exact solution of the ` +
  `same record (piecewise-exact recurrence) and sub-stepped until within ${100 * ACCURACY_TARGET}%; peaks between ` +
  `steps are read from cubic Hermite interpolants.`

export const PEAK_SEARCH_SUMMARY: Record<SpectrumMethod, string> = {
  'piecewise-exact':
    'No sub-steps: every peak between samples is found from the exact solution of each interval, searched ' +
    'wherever a rigorous bound cannot rule out a new peak.',
  'newmark-average': NEWMARK_SUMMARY,
  'newmark-linear': NEWMARK_SUMMARY,
}

import { type RunSpectrumLike, type SpectrumView, runSpectrumChartInput } from './runSpectrumChartInput.js'

/** A chart input with the usable-band limit of a filtered record set, so longer periods are shaded. */
export function withUsableBand<T extends { options: object }>(input: T, usablePeriodMaxS: number | null): T {
  return usablePeriodMaxS === null ? input : { ...input, options: { ...input.options, usablePeriodMaxS } }
}

/** runSpectrumChartInput, shading the periods beyond `usablePeriodMaxS` (none when null). */
export function runSpectrumChartInputWithBand(
  usablePeriodMaxS: number | null,
  spectrum: RunSpectrumLike,
  recordLabel: string,
  view: SpectrumView,
) {
  return withUsableBand(runSpectrumChartInput(spectrum, recordLabel, view), usablePeriodMaxS)
}

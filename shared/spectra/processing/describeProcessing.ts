import type { ProcessingStep, RecordProcessing } from '../../schemas/processing.js'
import { isSourceUnits, unitsStatement } from '../units.js'

const num = (x: number) => Number(x.toPrecision(4)).toString()

/** One step in words: "baseline order 1 removed; cosine taper 0.5 s each end; …". */
export function describeProcessingStep(step: Omit<ProcessingStep, 'sourceSha256'>): string {
  const parts: string[] = []
  if (step.baseline)
    parts.push(
      step.baseline.order === 0
        ? 'mean removed (baseline order 0)'
        : `least-squares baseline of order ${step.baseline.order} removed`,
    )
  if (step.taperS) parts.push(`cosine taper of ${num(step.taperS)} s at each end`)
  const filters = [
    step.highPass ? `high-pass ${num(step.highPass.hz)} Hz order ${step.highPass.order}` : null,
    step.lowPass ? `low-pass ${num(step.lowPass.hz)} Hz order ${step.lowPass.order}` : null,
  ].filter((f): f is string => f !== null)
  if (filters.length > 0) {
    const phase =
      step.phase === 'zero' ? 'zero phase, forward then backward from rest' : 'causal, forward once from rest'
    parts.push(`Butterworth ${filters.join(', then ')} (${phase})`)
    if (step.pads)
      parts.push(
        `zero pads of ${num(step.padS)} s at each end ${step.pads === 'keep' ? 'kept with the record' : 'removed after filtering'}`,
      )
  }
  return parts.length > 0 ? parts.join('; ') : 'no change (every step off)'
}

/**
 * The processing of a record as one sentence for method blocks, CSV headers, sheets and the
 * CLI. `sourceUnits` is the unit the original file was read in.
 */
export function describeProcessing(
  processing: RecordProcessing | null | undefined,
  sourceUnits: string,
): string {
  const units = sourceUnits === 'm/s²' ? 'm/s2' : sourceUnits
  const stated = isSourceUnits(units) ? unitsStatement(units) : `Read in ${sourceUnits}`
  const read = stated.charAt(0).toLowerCase() + stated.slice(1)
  if (!processing)
    return `Record as received: ${read}; no baseline correction or filtering applied by Ordinate.`
  const steps = processing.chain.map(
    (s, i) => `${processing.chain.length > 1 ? `step ${i + 1}: ` : ''}${describeProcessingStep(s)}`,
  )
  const original = processing.chain[0]?.sourceSha256 ?? processing.parentSha256
  const band =
    processing.usablePeriodMaxS !== null
      ? ` Usable periods up to ${num(processing.usablePeriodMaxS)} s (1/(1.25·f_hp)).`
      : ''
  const parent = processing.chain.length > 1 ? ` Parent record SHA-256 ${processing.parentSha256}.` : ''
  return `Processed by Ordinate from the original (SHA-256 ${original}, ${read}): ${steps.join('. ')}.${parent}${band}`
}

/**
 * The caution for a run whose periods go past the usable band of a high-pass filtered record
 * (common practice, no single source); null when they stay inside it.
 */
export function usableBandCaution(
  usablePeriodMaxS: number | null | undefined,
  longestPeriodS: number,
): string | null {
  if (usablePeriodMaxS == null || longestPeriodS <= usablePeriodMaxS) return null
  return `The record was high-pass filtered: ordinates at periods beyond ${num(usablePeriodMaxS)} s (1/(1.25·f_hp)) are outside its usable band and are not to be relied on.`
}

/** The tightest usable-band limit of these records, s; null when none was high-pass filtered. */
export function usablePeriodLimit(
  records: readonly { processing?: RecordProcessing | null }[],
): number | null {
  const limits = records.flatMap((r) =>
    r.processing?.usablePeriodMaxS != null ? [r.processing.usablePeriodMaxS] : [],
  )
  return limits.length ? Math.min(...limits) : null
}

/** The usable-band caution for a run on these records (the tightest limit of any of them), or null. */
export function usableBandCautionFor(
  records: readonly { processing?: RecordProcessing | null }[],
  periodsS: ArrayLike<number>,
): string | null {
  const limits = records.flatMap((r) =>
    r.processing?.usablePeriodMaxS != null ? [r.processing.usablePeriodMaxS] : [],
  )
  if (limits.length === 0 || periodsS.length === 0) return null
  return usableBandCaution(Math.min(...limits), Math.max(...Array.from(periodsS)))
}

import { M_PER_S2_PER_UNIT, SOURCE_UNITS, STANDARD_GRAVITY_M_PER_S2, type SourceUnits } from './units.js'

/**
 * Where a record's numbers stop looking like ground acceleration in the units given (the suites
 * issue): a PGA above 4 g or below 0.0005 g after conversion, or a time step above 0.1 s. Each
 * only warns; the upload goes ahead, and the 20 g refusal of parseRecord stays.
 */
export const PLAUSIBLE_PGA_G = { min: 0.0005, max: 4 } as const
export const PLAUSIBLE_MAX_DT_S = 0.1

/**
 * A middling strong-motion PGA, used only to rank which other unit would make the values look
 * most like a record (from memory; no single source).
 */
const TYPICAL_PGA_G = 0.2

export type UnitPlausibilityCode = 'pga-above-plausible' | 'pga-below-plausible' | 'dt-above-plausible'

export interface UnitPlausibilityWarning {
  code: UnitPlausibilityCode
  message: string
  /** The units the values most likely are in, when another unit would make them plausible. */
  likelyUnits?: SourceUnits
}

const UNIT_NAMES: Readonly<Record<SourceUnits, string>> = {
  g: 'g',
  'm/s2': 'm/s²',
  'cm/s2': 'cm/s²',
  'in/s2': 'in/s²',
}

const g3 = (value: number) => Number(value.toPrecision(3)).toString()

/** The other unit that would put the peak inside the plausible range, nearest a typical PGA. */
function likelyUnitsFor(
  peakInSource: number,
  sourceUnits: SourceUnits,
): { units: SourceUnits; pgaG: number } | null {
  let best: { units: SourceUnits; pgaG: number; distance: number } | null = null
  for (const units of SOURCE_UNITS) {
    if (units === sourceUnits) continue
    const pgaG = (peakInSource * M_PER_S2_PER_UNIT[units]) / STANDARD_GRAVITY_M_PER_S2
    if (pgaG < PLAUSIBLE_PGA_G.min || pgaG > PLAUSIBLE_PGA_G.max) continue
    const distance = Math.abs(Math.log10(pgaG / TYPICAL_PGA_G))
    if (!best || distance < best.distance) best = { units, pgaG, distance }
  }
  return best && { units: best.units, pgaG: best.pgaG }
}

/**
 * Warnings that the units or the time step were probably given wrongly, naming the likely
 * mistake ("the values look like m/s², not g"). `pgaMPerS2` is the peak after conversion from
 * `sourceUnits`.
 */
export function unitPlausibilityWarnings(
  pgaMPerS2: number,
  sourceUnits: SourceUnits,
  dtS: number,
): UnitPlausibilityWarning[] {
  const warnings: UnitPlausibilityWarning[] = []
  const pgaG = pgaMPerS2 / STANDARD_GRAVITY_M_PER_S2
  const from = UNIT_NAMES[sourceUnits]
  if (pgaG > PLAUSIBLE_PGA_G.max || (pgaG > 0 && pgaG < PLAUSIBLE_PGA_G.min)) {
    const high = pgaG > PLAUSIBLE_PGA_G.max
    const likely = likelyUnitsFor(pgaMPerS2 / M_PER_S2_PER_UNIT[sourceUnits], sourceUnits)
    const where = high
      ? `above ${PLAUSIBLE_PGA_G.max} g, more than recorded ground motions reach`
      : `below ${PLAUSIBLE_PGA_G.min} g, less than a felt ground motion`
    const mistake = likely
      ? ` The values look like ${UNIT_NAMES[likely.units]}, not ${from} (read as ${UNIT_NAMES[likely.units]}, PGA would be ${g3(likely.pgaG)} g).`
      : ''
    warnings.push({
      code: high ? 'pga-above-plausible' : 'pga-below-plausible',
      message: `PGA is ${g3(pgaG)} g after conversion from ${from}, ${where}.${mistake} Check the units.`,
      ...(likely ? { likelyUnits: likely.units } : {}),
    })
  }
  if (dtS > PLAUSIBLE_MAX_DT_S) {
    const asMs = dtS / 1000
    const hint =
      dtS >= 1 && asMs <= PLAUSIBLE_MAX_DT_S
        ? ` It looks like milliseconds: ${g3(dtS)} ms would be Δt = ${g3(asMs)} s.`
        : ' Check that the time step is in seconds and is not the sampling rate.'
    warnings.push({
      code: 'dt-above-plausible',
      message: `Δt = ${g3(dtS)} s is longer than ${PLAUSIBLE_MAX_DT_S} s, coarser than ground-motion records are sampled.${hint}`,
    })
  }
  return warnings
}

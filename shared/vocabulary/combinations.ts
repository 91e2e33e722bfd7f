import { z } from 'zod'

/**
 * How a pair run combines its two horizontal components: the geometric mean √(S₁·S₂) of the
 * components as recorded, or RotD50 / RotD100, the median / largest of the peaks over
 * rotation angles 0°–179° (Boore 2010, BSSA 100(4)).
 */
export const COMBINATIONS = ['geomean', 'rotd50', 'rotd100'] as const
export type Combination = (typeof COMBINATIONS)[number]

/** The one wording of each combination, for legends, tables, CSV headers, sheets and pages. */
export const COMBINATION_LABELS: Readonly<Record<Combination, string>> = {
  geomean: 'Geometric mean',
  rotd50: 'RotD50',
  rotd100: 'RotD100',
}

/**
 * The combination a comparison reads from a pair run when none is chosen: the maximum
 * direction, since ASCE 7-22 ch. 16 scales pairs on a maximum-direction spectrum (from memory).
 */
export const MAXIMUM_DIRECTION: Combination = 'rotd100'

const listed = COMBINATIONS.join(', ')

/** A combination named in a request or a stored row. */
export const combinationSchema = z.enum(COMBINATIONS, { error: `Each combination must be one of ${listed}.` })

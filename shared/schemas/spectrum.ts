import { z } from 'zod'
import { SOURCE_UNITS } from '../spectra/units.js'
import { combinationSchema } from '../vocabulary/combinations.js'
import { groundMotionShape } from './groundMotion.js'
import { runMethodSchema, runSettingsSchema } from './runs.js'
import { methodStatementSchema, spectrumWarningSchema } from './spectrumWorker.js'

/**
 * The spectrum of a record as JSON, SI units: what `npm run spectrum` prints and
 * what the API answers for a run (with the run's `settings` added).
 */

export const sourceUnitsSchema = z.enum(SOURCE_UNITS)

const nonNegative = z.number().nonnegative()
const series = z.array(nonNegative)

/** The record's parameters; PSA at T = 0 is the PGA given here. */
export const spectrumRecordSchema = z.object({
  points: z.number().int().min(2),
  dtS: z.number().positive(),
  durationS: nonNegative,
  sourceUnits: sourceUnitsSchema,
  ...groundMotionShape(nonNegative),
})
export type SpectrumRecordSummary = z.infer<typeof spectrumRecordSchema>

/** A pair run's pair and its two components as read, each with its own source units. */
export const spectrumPairSchema = z.object({
  id: z.string(),
  name: z.string(),
  components: z.array(spectrumRecordSchema.extend({ name: z.string(), sha256: z.string() })),
})
export type SpectrumPair = z.infer<typeof spectrumPairSchema>

/** One damping ratio's ordinates, in the order of `periodsS`. Peak times are given for single records. */
export const spectrumCurveSchema = z.object({
  dampingRatio: z.number().min(0).lt(0.5),
  /** How two horizontal components were combined (absent for a single record). */
  combination: combinationSchema.optional(),
  sdM: series,
  svMPerS: series,
  saMPerS2: series,
  psvMPerS: series,
  psaMPerS2: series,
  sdTimeS: series.optional(),
  saTimeS: series.optional(),
})
export type SpectrumCurveJson = z.infer<typeof spectrumCurveSchema>

const SERIES_KEYS = ['sdM', 'svMPerS', 'saMPerS2', 'psvMPerS', 'psaMPerS2', 'sdTimeS', 'saTimeS'] as const

export const spectrumResultSchema = z
  .object({
    record: spectrumRecordSchema,
    method: runMethodSchema,
    methodStatement: methodStatementSchema,
    /** Cautions about the record and the computation, none of them blocking, worded for people. */
    warnings: z.array(z.string()),
    /**
     * The computation's warnings as codes and values, for code to act on (absent in spectra stored
     * before warnings had codes, whose `warnings` are read as stored).
     */
    warningCodes: z.array(spectrumWarningSchema).optional(),
    periodsS: z.array(z.number().positive()).min(1),
    curves: z.array(spectrumCurveSchema).min(1),
    /** Pair runs: the pair and both components (`record` holds the first component's parameters). */
    pair: spectrumPairSchema.optional(),
    /** The run's settings, when the API answers. */
    settings: runSettingsSchema.optional(),
  })
  .superRefine((result, context) => {
    result.curves.forEach((curve, index) => {
      for (const key of SERIES_KEYS) {
        const values = curve[key]
        if (values && values.length !== result.periodsS.length) {
          context.addIssue({
            code: 'custom',
            path: ['curves', index, key],
            message: `${key} holds ${values.length} values for ${result.periodsS.length} periods.`,
          })
        }
      }
    })
  })
export type SpectrumResult = z.infer<typeof spectrumResultSchema>

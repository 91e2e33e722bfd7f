import type { z } from 'zod'
import { type RunSettings, runSettingsSchema } from '../../shared/schemas/runs.js'
import { spectrumResultSchema } from '../../shared/schemas/spectrum.js'

/**
 * Parses a value read back from the database. A mismatch there is our fault, not the
 * client's, so it throws a plain Error (answered 500 and logged) instead of the ZodError
 * that the error handler turns into a 400 for request input.
 */
export function parseStored<S extends z.ZodType>(schema: S, value: unknown, what: string): z.output<S> {
  const parsed = schema.safeParse(value)
  if (!parsed.success) {
    const first = parsed.error.issues[0]
    throw new Error(
      `Stored ${what} does not match its schema: ${first?.path.join('.') ?? ''} ${first?.message ?? ''}`,
    )
  }
  return parsed.data
}

/*
 * The JSON columns of the run tables, each decoded by its shared schema in one place, so a row
 * that does not match answers the same 500 wherever it is read.
 */

/** runs.settings */
export const decodeRunSettings = (value: unknown): RunSettings =>
  parseStored(runSettingsSchema, value, 'run settings')

/** A pair run's spectrum also names the pair and both components: kept as stored. */
const storedSpectrumResultSchema = spectrumResultSchema.loose()
export type StoredSpectrumResult = z.output<typeof storedSpectrumResultSchema>

/** spectra.result */
export const decodeSpectrumResult = (value: unknown): StoredSpectrumResult =>
  parseStored(storedSpectrumResultSchema, value, 'spectrum')

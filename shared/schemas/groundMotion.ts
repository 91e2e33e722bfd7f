import { z } from 'zod'

/**
 * A record's ground-motion parameters in SI, named as in shared/spectra/recordParameters.ts
 * (PGA, PGV, PGD, Arias intensity, D5-95, plain CAV); `value` is the schema each one takes.
 */
export const groundMotionShape = (value: z.ZodNumber = z.number()) => ({
  pgaMPerS2: value,
  pgvMPerS: value,
  pgdM: value,
  ariasMPerS: value,
  d595S: value,
  cavMPerS: value,
})

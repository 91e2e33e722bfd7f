import { records } from '../db/schema.js'

/** The record columns a spectrum's JSON states (its parameters), with the record's warnings. */
export const recordSummaryColumns = {
  points: records.points,
  dtS: records.dtS,
  durationS: records.durationS,
  sourceUnits: records.sourceUnits,
  pgaMPerS2: records.pgaMPerS2,
  pgvMPerS: records.pgvMPerS,
  pgdM: records.pgdM,
  ariasMPerS: records.ariasMPerS,
  d595S: records.d595S,
  cavMPerS: records.cavMPerS,
  warnings: records.warnings,
}

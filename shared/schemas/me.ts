import { z } from 'zod'
import { sessionInfoSchema } from './accounts.js'

/**
 * The member's units for pages, tables, charts and files. JSON answers stay SI whatever the
 * choice. US customary: SD in inches, SV and PSV in in/s, SA and PSA in g.
 */
export const unitSystemSchema = z.enum(['si', 'us'], { error: 'units must be si or us.' })
export type UnitSystem = z.infer<typeof unitSystemSchema>

/** GET /api/me: who is signed in, their firm and roles, and their preferences. */
export const meSchema = sessionInfoSchema.extend({ units: unitSystemSchema })
export type Me = z.infer<typeof meSchema>

/** PATCH /api/me */
export const updateMeBodySchema = z.strictObject({ units: unitSystemSchema })
export type UpdateMeBody = z.infer<typeof updateMeBodySchema>

/**
 * `?units=si|us` on file routes (CSV and sheets): overrides the member's preference for one
 * download. Spread into a route's strict query schema.
 */
export const fileUnitsQueryShape = { units: unitSystemSchema.optional() }

/** The query of a file route that takes nothing but `?units=`. */
export const fileUnitsQuerySchema = z.strictObject(fileUnitsQueryShape)

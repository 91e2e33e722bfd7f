import { type Me, type UnitSystem, meSchema } from '../../shared/schemas/me'
import { apiRequest } from './client'

export type { Me, UnitSystem } from '../../shared/schemas/me'

/** `GET /api/me`: the signed-in member with their preferences. */
export function getMe(): Promise<Me> {
  return apiRequest('/api/me', meSchema)
}

/** `PATCH /api/me`: the member's units for pages, tables, charts and files. */
export function updateMyUnits(units: UnitSystem): Promise<Me> {
  return apiRequest('/api/me', meSchema, { method: 'PATCH', body: { units } })
}

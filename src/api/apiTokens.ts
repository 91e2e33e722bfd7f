import { z } from 'zod'
import {
  type ApiToken,
  type CreateApiTokenBody,
  type CreatedApiToken,
  type FirmApiToken,
  apiTokenListSchema,
  createdApiTokenSchema,
  firmApiTokenListSchema,
} from '../../shared/schemas/apiTokens'
import { apiRequest } from './client'

export type {
  ApiToken,
  CreateApiTokenBody,
  CreatedApiToken,
  FirmApiToken,
} from '../../shared/schemas/apiTokens'

/** `GET /api/me/tokens`: the member's own tokens, never their secrets. */
export async function listApiTokens(): Promise<ApiToken[]> {
  return (await apiRequest('/api/me/tokens', apiTokenListSchema)).items
}

/** `POST /api/me/tokens` (201): the only answer that holds the secret. */
export function createApiToken(body: CreateApiTokenBody): Promise<CreatedApiToken> {
  return apiRequest('/api/me/tokens', createdApiTokenSchema, { method: 'POST', body })
}

/** `DELETE /api/me/tokens/:id` (204): the token stops working at once. */
export async function revokeApiToken(id: string): Promise<void> {
  await apiRequest(`/api/me/tokens/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' })
}

/** `GET /api/firm/tokens` (admins): every member's tokens, with their owners. */
export async function listFirmApiTokens(): Promise<FirmApiToken[]> {
  return (await apiRequest('/api/firm/tokens', firmApiTokenListSchema)).items
}

/** `DELETE /api/firm/tokens/:id` (admins): revoke any token in the firm. */
export async function revokeFirmApiToken(id: string): Promise<void> {
  await apiRequest(`/api/firm/tokens/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' })
}

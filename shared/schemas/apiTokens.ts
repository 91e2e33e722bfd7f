import { z } from 'zod'
import { listOf, nameInputSchema } from './common.js'
import { roleSchema } from './accounts.js'

/** Every API token starts with this, so a leaked one is easy to recognise and search for. */
export const API_TOKEN_PREFIX = 'ordt_'

/**
 * POST /api/me/tokens. `roles` defaults to all of the member's roles and may not exceed them;
 * `expiresAt` (milliseconds since the epoch, UTC) is optional and must lie in the future.
 */
export const createApiTokenBodySchema = z.strictObject({
  name: nameInputSchema('Give the token a name, for example "suite scripts".', 100),
  roles: z
    .array(roleSchema)
    .min(1, 'Give the token at least one role.')
    .refine((r) => new Set(r).size === r.length, 'Give each role once.')
    .optional(),
  expiresAt: z
    .number({ error: 'expiresAt must be a time in milliseconds since 1970-01-01 UTC.' })
    .int('expiresAt must be a whole number of milliseconds.')
    .optional(),
})
export type CreateApiTokenBody = z.infer<typeof createApiTokenBodySchema>

/** A token as lists show it: never the secret, only its first characters to tell tokens apart. */
export const apiTokenSchema = z.object({
  id: z.string(),
  name: z.string(),
  roles: z.array(roleSchema),
  /** The token's first characters (prefix included), e.g. "ordt_3fK9". */
  hint: z.string(),
  createdAt: z.number(),
  expiresAt: z.number().nullable(),
  lastUsedAt: z.number().nullable(),
})
export type ApiToken = z.infer<typeof apiTokenSchema>

/** The answer of POST /api/me/tokens (201): the only time the secret is shown. */
export const createdApiTokenSchema = apiTokenSchema.extend({ token: z.string() })
export type CreatedApiToken = z.infer<typeof createdApiTokenSchema>

/** GET /api/me/tokens */
export const apiTokenListSchema = listOf(apiTokenSchema)
export type ApiTokenList = z.infer<typeof apiTokenListSchema>

/** A token in the admin's list of the firm's tokens, with its owner. */
export const firmApiTokenSchema = apiTokenSchema.extend({
  owner: z.object({ id: z.string(), name: z.string(), email: z.string() }),
})
export type FirmApiToken = z.infer<typeof firmApiTokenSchema>

/** GET /api/firm/tokens */
export const firmApiTokenListSchema = listOf(firmApiTokenSchema)
export type FirmApiTokenList = z.infer<typeof firmApiTokenListSchema>

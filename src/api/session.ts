import { z } from 'zod'
import { type SessionInfo, sessionInfoSchema } from '../../shared/schemas/accounts'
import { apiRequest } from './client'

export type { Role, SessionInfo } from '../../shared/schemas/accounts'

export interface SignInInput {
  email: string
  password: string
}

/** `POST /api/auth/sign-in`: starts a session; 401 on bad credentials, 429 when rate-limited. */
export function signIn(input: SignInInput): Promise<SessionInfo> {
  return apiRequest('/api/auth/sign-in', sessionInfoSchema, { method: 'POST', body: input })
}

/** `POST /api/auth/sign-out`: ends the session (204). */
export async function signOut(): Promise<void> {
  await apiRequest('/api/auth/sign-out', z.undefined(), { method: 'POST' })
}

/** `GET /api/me`: the signed-in member, or ApiError with status 401. */
export function getMe(): Promise<SessionInfo> {
  return apiRequest('/api/me', sessionInfoSchema)
}

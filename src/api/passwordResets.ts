import { z } from 'zod'
import {
  type CompletePasswordResetBody,
  type RequestPasswordResetBody,
  passwordResetRequestedSchema,
} from '../../shared/schemas/passwordResets'
import { apiRequest } from './client'

/**
 * `POST /api/auth/password-reset`: asks for a reset link. Answers the same
 * message whether or not the address has an account; 429 when rate-limited.
 */
export async function requestPasswordReset(body: RequestPasswordResetBody): Promise<string> {
  return (
    await apiRequest('/api/auth/password-reset', passwordResetRequestedSchema, { method: 'POST', body })
  ).message
}

/** `POST /api/auth/password-reset/:token`: sets the new password (204). */
export async function completePasswordReset(token: string, body: CompletePasswordResetBody): Promise<void> {
  await apiRequest(`/api/auth/password-reset/${encodeURIComponent(token)}`, z.undefined(), {
    method: 'POST',
    body,
  })
}

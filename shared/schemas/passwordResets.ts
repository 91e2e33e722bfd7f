import { z } from 'zod'
import { passwordSchema } from './accounts.js'
import { emailSchema } from './tokens.js'

/** POST /api/auth/password-reset */
export const requestPasswordResetBodySchema = z.strictObject({ email: emailSchema })
export type RequestPasswordResetBody = z.input<typeof requestPasswordResetBodySchema>

/** POST /api/auth/password-reset/:token */
export const completePasswordResetBodySchema = z.strictObject({ password: passwordSchema })
export type CompletePasswordResetBody = z.input<typeof completePasswordResetBodySchema>

/** The 202 answer, the same whether or not the address has an account. */
export const passwordResetRequestedSchema = z.object({ message: z.string() })

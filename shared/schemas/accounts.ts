import { z } from 'zod'
import { namedIdSchema } from './common.js'

export const roleSchema = z.enum(['engineer', 'checker', 'admin'])
export type Role = z.infer<typeof roleSchema>

export const MIN_PASSWORD_LENGTH = 10

export const signInBodySchema = z.strictObject({
  email: z.string().trim().toLowerCase().pipe(z.email('Enter a valid e-mail address.')),
  password: z.string().min(1, 'Enter your password.').max(1024),
})

export const passwordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(1024, 'Use at most 1024 characters.')

/** The answer of sign-in and of GET /api/me. */
export const sessionInfoSchema = z.object({
  user: z.object({ id: z.string(), email: z.string(), name: z.string() }),
  firm: namedIdSchema,
  roles: z.array(roleSchema),
})
export type SessionInfo = z.infer<typeof sessionInfoSchema>

import { z } from 'zod'

/** A token from an invitation or reset link: 32 random bytes in base64url (43 characters). */
export const tokenParamsSchema = z.strictObject({
  token: z
    .string()
    .regex(/^[A-Za-z0-9_-]{43}$/, 'This link is not complete: copy the whole address from the e-mail.'),
})

/** An e-mail address as typed, trimmed and lower-cased, as sign-in compares it. */
export const emailSchema = z.string().trim().toLowerCase().pipe(z.email('Enter a valid e-mail address.'))

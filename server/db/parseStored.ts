import type { z } from 'zod'

/**
 * Parses a value read back from the database. A mismatch there is our fault, not the
 * client's, so it throws a plain Error (answered 500 and logged) instead of the ZodError
 * that the error handler turns into a 400 for request input.
 */
export function parseStored<S extends z.ZodType>(schema: S, value: unknown, what: string): z.output<S> {
  const parsed = schema.safeParse(value)
  if (!parsed.success) {
    const first = parsed.error.issues[0]
    throw new Error(
      `Stored ${what} does not match its schema: ${first?.path.join('.') ?? ''} ${first?.message ?? ''}`,
    )
  }
  return parsed.data
}

import { createHash, randomBytes } from 'node:crypto'
import { HttpError, notFound } from '../httpError.js'

/** SHA-256 of a token, hex: the only form in which invitation and reset tokens are stored. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}

/**
 * A single-use secret for a link in an e-mail: 32 random bytes (256 bits), base64url, so it is
 * 43 characters long. Only its hash is kept, so a copy of the database cannot be used to follow links.
 */
export function newToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, tokenHash: hashToken(token) }
}

/** What a person is told when a link cannot be followed: [code, message] for each case. */
export interface LinkRefusals {
  /** Names the link in the 404 of an unknown token ("This reset link"). */
  missing: string
  used: [code: string, message: string]
  expired: [code: string, message: string]
}

/**
 * The row a single-use link opens, still usable: no row is 404, a spent link (`spent(row)`)
 * or one past its `expiresAt` is 410, each with the refusal given.
 */
export function usableLink<R extends { expiresAt: number }>(
  row: R | undefined,
  spent: (row: R) => boolean,
  refusals: LinkRefusals,
): R {
  if (!row) throw notFound(refusals.missing)
  if (spent(row)) throw new HttpError(410, ...refusals.used)
  if (row.expiresAt <= Date.now()) throw new HttpError(410, ...refusals.expired)
  return row
}

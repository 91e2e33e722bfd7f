import { createHash, randomBytes } from 'node:crypto'

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

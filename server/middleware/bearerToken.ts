import type { NextFunction, Request, RequestHandler, Response } from 'express'
import type { Db } from '../db/client.js'
import { unauthorized } from '../httpError.js'
import { authenticateApiToken } from '../services/apiTokens.js'

declare module 'express-serve-static-core' {
  interface Request {
    /** Set when the request was authenticated by an API token (Authorization: Bearer). */
    apiTokenId?: string
  }
}

const BEARER = /^Bearer +(\S+) *$/i

/**
 * Loads req.member from an `Authorization: Bearer <API token>` header. A request that sends
 * the header is judged by the token alone: a malformed, unknown, revoked or expired token
 * answers 401 and the session cookie is never consulted instead. Requests without the header
 * pass through untouched.
 */
export function loadBearerMember(db: Db): RequestHandler {
  return (req: Request, _res: Response, next: NextFunction) => {
    const header = req.get('authorization')
    if (header === undefined) return next()
    const secret = BEARER.exec(header)?.[1]
    if (!secret) return next(unauthorized('Send the API token as "Authorization: Bearer <token>".'))
    const found = authenticateApiToken(db, secret)
    if (!found) {
      return next(
        unauthorized(
          'This API token is not valid: it is unknown, revoked or expired, or its member has left the firm.',
        ),
      )
    }
    req.member = found.member
    req.apiTokenId = found.tokenId
    next()
  }
}

/**
 * Runs `handler` only for requests not authenticated by an API token: the session loader (a
 * token request never falls back to the cookie) and the CSRF guard (a browser cannot attach an
 * Authorization header to a cross-site request, so bearer requests need no CSRF header).
 */
export function unlessBearer(handler: RequestHandler): RequestHandler {
  return (req, res, next) => (req.apiTokenId ? next() : handler(req, res, next))
}

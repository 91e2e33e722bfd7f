import type { NextFunction, Request, Response } from 'express'
import { forbidden } from '../httpError.js'

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

/** The header Ordinate's own client sends; a cross-site form or fetch cannot set it without a preflight we never grant. */
export const CSRF_HEADER = 'x-ordinate-client'

/**
 * CSRF protection for state-changing requests by Origin/Referer check (OWASP CSRF cheat sheet,
 * "verifying origin with standard headers"): the request must come from our own origin, or,
 * when a client sends neither header, carry the custom header above.
 */
export function csrfGuard(allowedOrigins: () => string[]) {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (SAFE.has(req.method)) return next()
    const ownOrigin = `${req.protocol}://${req.get('host') ?? ''}`
    const allowed = new Set([ownOrigin, ...allowedOrigins()])
    const origin = req.get('origin')
    if (origin && origin !== 'null') {
      return allowed.has(origin) ? next() : next(forbidden('Cross-site request refused (origin mismatch).'))
    }
    const referer = req.get('referer')
    if (referer) {
      let refOrigin = ''
      try {
        refOrigin = new URL(referer).origin
      } catch {
        // an unparsable Referer is treated as foreign
      }
      return allowed.has(refOrigin)
        ? next()
        : next(forbidden('Cross-site request refused (referer mismatch).'))
    }
    if (req.get(CSRF_HEADER)) return next()
    next(forbidden(`Cross-site request refused: send the ${CSRF_HEADER} header or a same-origin Origin.`))
  }
}

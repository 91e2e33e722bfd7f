import type { Request, RequestHandler } from 'express'
import { ipKeyGenerator, rateLimit, type Options } from 'express-rate-limit'
import type { Config } from '../config.js'
import { HttpError } from '../httpError.js'

type Limits = Config['rateLimits']

/** The e-mail a sign-in or reset request names, normalised as the body schemas normalise it. */
function bodyEmail(req: Request): string | undefined {
  const email: unknown = (req.body as { email?: unknown } | undefined)?.email
  return typeof email === 'string' && email.trim() ? email.trim().toLowerCase() : undefined
}

function limiter(name: string, windowMs: number, limit: number, extra: Partial<Options>): RequestHandler {
  return rateLimit({
    windowMs,
    limit,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    requestPropertyName: `rateLimit_${name}`,
    handler: (req, res, next) => {
      const info = (req as unknown as Record<string, { resetTime?: Date }>)[`rateLimit_${name}`]
      const waitS = Math.max(
        1,
        Math.ceil(((info?.resetTime?.getTime() ?? Date.now() + windowMs) - Date.now()) / 1000),
      )
      res.setHeader('Retry-After', String(waitS))
      const minutes = Math.ceil(waitS / 60)
      next(
        new HttpError(
          429,
          'rate_limited',
          `Too many attempts. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`,
        ),
      )
    },
    ...extra,
  })
}

const byAddress = (req: Request) => ipKeyGenerator(req.ip ?? req.socket.remoteAddress ?? 'unknown')

/**
 * Sign-in limiters, per client address and per e-mail: only failed attempts count
 * (a 4xx/5xx answer), so members who type their password right are never slowed down,
 * while guessing one account from many addresses, or many accounts from one address, is.
 * OWASP authentication cheat sheet, "protect against automated attacks".
 */
export function signInLimiters(limits: Limits): RequestHandler[] {
  const failuresOnly = { skipSuccessfulRequests: true }
  return [
    limiter('signInAddress', limits.windowMs, limits.signInFailuresPerAddress, {
      ...failuresOnly,
      keyGenerator: byAddress,
    }),
    limiter('signInEmail', limits.windowMs, limits.signInFailuresPerEmail, {
      ...failuresOnly,
      keyGenerator: (req) => `email:${bodyEmail(req) ?? ''}`,
      skip: (req) => bodyEmail(req) === undefined,
    }),
  ]
}

/**
 * Password-reset request limiters. Every request counts, and the count does not depend on
 * whether the address belongs to an account, so a 429 reveals nothing either.
 */
export function passwordResetLimiters(limits: Limits): RequestHandler[] {
  return [
    limiter('resetAddress', limits.windowMs, limits.passwordResetsPerWindow, { keyGenerator: byAddress }),
    limiter('resetEmail', limits.windowMs, limits.passwordResetsPerWindow, {
      keyGenerator: (req) => `email:${bodyEmail(req) ?? ''}`,
      skip: (req) => bodyEmail(req) === undefined,
    }),
  ]
}

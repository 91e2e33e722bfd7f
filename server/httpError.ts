/** Fields an error may carry beside code and message: the file line, zod issues, or a shortfall of credits. */
export interface ErrorExtra {
  line?: number
  issues?: unknown[]
  needed?: number
  balance?: number
}

/** An error with an HTTP status and a stable machine-readable code, thrown by services. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly extra: ErrorExtra = {},
  ) {
    super(message)
    this.name = 'HttpError'
  }
}

export const badRequest = (
  message: string,
  code = 'bad_request',
  extra: { line?: number; issues?: unknown[] } = {},
) => new HttpError(400, code, message, extra)
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthorized', message)
export const paymentRequired = (message: string, code = 'payment_required', extra: ErrorExtra = {}) =>
  new HttpError(402, code, message, extra)
export const forbidden = (message: string) => new HttpError(403, 'forbidden', message)
export const notFound = (what = 'That item') => new HttpError(404, 'not_found', `${what} was not found.`)
export const conflict = (message: string, code = 'conflict') => new HttpError(409, code, message)
export const tooLarge = (message: string) => new HttpError(413, 'too_large', message)
export const badGateway = (message: string, code = 'upstream_failed') => new HttpError(502, code, message)

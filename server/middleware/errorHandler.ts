import { randomUUID } from 'node:crypto'
import type { NextFunction, Request, Response } from 'express'
import multer from 'multer'
import { ZodError } from 'zod'
import { HttpError } from '../httpError.js'

function describeZod(err: ZodError): string {
  const first = err.issues[0]
  if (!first) return 'The request is not valid.'
  const where = first.path.length ? `${first.path.join('.')}: ` : ''
  return `${where}${first.message}`
}

/** The one error middleware, registered last. Every failure answers `{ error: { code, message, line?, issues? } }`. */
export function errorHandler(log: (line: string) => void = console.error) {
  return (err: unknown, req: Request, res: Response, next: NextFunction) => {
    if (res.headersSent) return next(err)
    if (err instanceof ZodError) {
      res.status(400).json({
        error: {
          code: 'invalid_input',
          message: describeZod(err),
          issues: err.issues.map((i) => ({ path: i.path.map(String), message: i.message })),
        },
      })
      return
    }
    if (err instanceof HttpError) {
      res.status(err.status).json({ error: { code: err.code, message: err.message, ...err.extra } })
      return
    }
    if (err instanceof multer.MulterError) {
      const status = err.code === 'LIMIT_FILE_SIZE' ? 413 : 400
      res.status(status).json({ error: { code: err.code.toLowerCase(), message: multerMessage(err) } })
      return
    }
    // body-parser errors carry a status and a type (e.g. entity.parse.failed, entity.too.large).
    const e = err as { status?: number; type?: string; message?: string }
    if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
      const message =
        e.type === 'entity.parse.failed'
          ? 'The request body is not valid JSON.'
          : e.type === 'entity.too.large'
            ? 'The request body is too large.'
            : (e.message ?? 'Bad request.')
      res.status(e.status).json({ error: { code: (e.type ?? 'bad_request').replace(/\./g, '_'), message } })
      return
    }
    const requestId = randomUUID()
    // The matched route's pattern (relative to its router), never the path: invitation and
    // reset paths carry single-use tokens.
    const pattern: unknown = (req.route as { path?: unknown } | undefined)?.path
    const route = pattern === undefined ? 'outside any route' : `route ${String(pattern)}`
    log(
      `[${requestId}] ${req.method} ${route} failed: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`,
    )
    res.status(500).json({
      error: { code: 'internal', message: `Something went wrong on our side (request ${requestId}).` },
    })
  }
}

function multerMessage(err: multer.MulterError): string {
  switch (err.code) {
    case 'LIMIT_FILE_SIZE':
      return 'The file is larger than the upload limit.'
    case 'LIMIT_UNEXPECTED_FILE':
      return `Unexpected file field "${err.field ?? ''}".`
    default:
      return err.message
  }
}

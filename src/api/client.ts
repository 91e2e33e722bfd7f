import type { z } from 'zod'
import { apiErrorSchema } from '../../shared/schemas/common'

/**
 * An API failure in the server's one error shape
 * `{ error: { code, message, line?, issues? } }`, with the HTTP status.
 * Network failures and unreadable answers become status 0 with code `network`
 * or `bad_response`.
 */
export class ApiError extends Error {
  override readonly name = 'ApiError'
  readonly status: number
  readonly code: string
  readonly line: number | undefined
  readonly issues: unknown[] | undefined

  constructor(
    status: number,
    code: string,
    message: string,
    extra: { line?: number | undefined; issues?: unknown[] | undefined } = {},
  ) {
    super(message)
    this.status = status
    this.code = code
    this.line = extra.line
    this.issues = extra.issues
  }
}

/** The header the server's CSRF guard accepts from Ordinate's own client. */
const CLIENT_HEADER = { 'X-Ordinate-Client': '1' }

export type QueryValue = string | number | boolean | undefined

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE'
  /** Sent as JSON, or as-is when it is FormData (uploads). */
  body?: unknown
  query?: Record<string, QueryValue>
  signal?: AbortSignal
}

function urlFor(path: string, query: Record<string, QueryValue> | undefined): string {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(query ?? {})) {
    if (value !== undefined) params.set(key, String(value))
  }
  const qs = params.toString()
  return qs ? `${path}?${qs}` : path
}

/** The ApiError of a failed answer: the server's error shape when the body has it, else a message built from the status. */
export function apiErrorOf(status: number, statusText: string, body: unknown): ApiError {
  const parsed = apiErrorSchema.safeParse(body)
  if (parsed.success) {
    const { code, message, line, issues } = parsed.data.error
    return new ApiError(status, code, message, { line, issues })
  }
  return new ApiError(status, 'http_error', `The server answered ${status} ${statusText}`.trim() + '.')
}

async function errorFrom(response: Response): Promise<ApiError> {
  // A body that is not JSON falls through to a message built from the status.
  const body: unknown = await response.json().catch(() => null)
  return apiErrorOf(response.status, response.statusText, body)
}

/**
 * Sends one same-origin request to the API with the session cookie and reads
 * the JSON answer through `schema` (zod at the edge). Resolves `undefined` for
 * 204 and 202-without-body answers. Throws ApiError on any failure.
 */
export async function apiRequest<S extends z.ZodType>(
  path: string,
  schema: S,
  options: RequestOptions = {},
): Promise<z.infer<S>> {
  const isForm = typeof FormData !== 'undefined' && options.body instanceof FormData
  const headers: Record<string, string> = { Accept: 'application/json', ...CLIENT_HEADER }
  if (options.body !== undefined && !isForm) headers['Content-Type'] = 'application/json'
  let response: Response
  try {
    response = await fetch(urlFor(path, options.query), {
      method: options.method ?? 'GET',
      credentials: 'same-origin',
      headers,
      body:
        options.body === undefined
          ? undefined
          : isForm
            ? (options.body as FormData)
            : JSON.stringify(options.body),
      signal: options.signal,
    })
  } catch (err) {
    if (err instanceof DOMException && err.name === 'AbortError') throw err
    throw new ApiError(
      0,
      'network',
      'Ordinate could not reach its server. Check the connection and try again.',
    )
  }
  if (!response.ok) throw await errorFrom(response)
  const text = await response.text()
  let body: unknown = undefined
  if (text !== '') {
    try {
      body = JSON.parse(text)
    } catch {
      throw new ApiError(
        response.status,
        'bad_response',
        'The server sent an answer Ordinate could not read.',
      )
    }
  }
  const parsed = schema.safeParse(body)
  if (!parsed.success) {
    throw new ApiError(
      response.status,
      'bad_response',
      'The server sent an answer Ordinate did not expect.',
      {
        issues: parsed.error.issues,
      },
    )
  }
  return parsed.data
}

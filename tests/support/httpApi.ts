/** An answer of the API over HTTP: its status and parsed JSON body (null when the body is not JSON). */
export interface HttpAnswer<T = Record<string, unknown>> {
  status: number
  body: T
}

export type HttpApi<T = Record<string, unknown>> = (
  method: string,
  route: string,
  body?: unknown,
) => Promise<HttpAnswer<T>>

/**
 * Signs a demo member in to a running server and answers a client that keeps the session cookie
 * and sends the CSRF header on every request (JSON bodies, or FormData as multipart).
 */
export async function signInHttp<T = Record<string, unknown>>(
  baseUrl: string,
  email: string,
  password = 'ordinate-demo',
): Promise<HttpApi<T>> {
  const res = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-ordinate-client': '1' },
    body: JSON.stringify({ email, password }),
  })
  if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}: ${await res.text()}`)
  const cookie = res.headers.get('set-cookie')?.split(';')[0]
  if (!cookie) throw new Error('sign-in set no cookie')
  return async (method, route, body) => {
    const headers: Record<string, string> = { cookie, 'x-ordinate-client': '1' }
    const init: RequestInit = { method, headers }
    if (body instanceof FormData) init.body = body
    else if (body !== undefined) {
      init.body = JSON.stringify(body)
      headers['content-type'] = 'application/json'
    }
    const answer = await fetch(`${baseUrl}/api${route}`, init)
    const text = await answer.text()
    let parsed: unknown = null
    try {
      parsed = JSON.parse(text)
    } catch {
      parsed = null
    }
    return { status: answer.status, body: parsed as T }
  }
}

import { type MessageApi, createDiscreteApi } from 'naive-ui'
import { ApiError } from '@/api/client'
import { locale, themeOverrides } from '@/theme'

let messages: MessageApi | null = null

/**
 * naive-ui's discrete message API works outside components, so stores and
 * router guards can report through the same channel as views.
 */
function messageApi(): MessageApi {
  if (messages === null) {
    messages = createDiscreteApi(['message'], {
      configProviderProps: { themeOverrides, locale },
      messageProviderProps: { placement: 'top', duration: 6000, keepAliveOnHover: true, max: 4 },
    }).message
  }
  return messages
}

/** What a person should read for an error: the server's own message where there is one. */
export function messageFor(error: unknown): string {
  if (error instanceof ApiError) {
    return error.line === undefined ? error.message : `${error.message} (line ${error.line})`
  }
  if (error instanceof Error && error.message) return error.message
  return 'Something went wrong. Try again, and tell your administrator if it keeps happening.'
}

/**
 * The one error reporter: shows a naive-ui message and returns its text so a
 * store can keep it in its `error` state. Aborted requests are not reported.
 */
export function useErrorReporter() {
  function report(error: unknown, context?: string): string {
    const text = context ? `${context}: ${messageFor(error)}` : messageFor(error)
    if (!(error instanceof DOMException && error.name === 'AbortError')) {
      messageApi().error(text)
    }
    return text
  }
  function notify(text: string): void {
    messageApi().success(text)
  }
  return { report, notify, messageFor }
}

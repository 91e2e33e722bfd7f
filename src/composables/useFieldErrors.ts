import { type Ref, ref } from 'vue'
import { ApiError } from '@/api/client'

interface Issue {
  path: readonly PropertyKey[]
  message: string
}

type Parsed<T> = { success: true; data: T } | { success: false; error: { issues: readonly Issue[] } }

function asIssues(raw: readonly unknown[] | undefined): Issue[] {
  return (raw ?? []).flatMap((item) => {
    if (typeof item !== 'object' || item === null) return []
    const { path, message } = item as { path?: unknown; message?: unknown }
    return Array.isArray(path) && typeof message === 'string'
      ? [{ path: path as PropertyKey[], message }]
      : []
  })
}

/**
 * Field-level messages for a form, from zod issues (checked in the browser
 * before sending) or from the server's `error.issues`, plus one form-level
 * message for everything else (wrong password, expired link, rate limit…).
 */
export function useFieldErrors<F extends string>(fields: readonly F[]) {
  const errors = ref({}) as Ref<Partial<Record<F, string>>>
  const formMessage = ref<string | null>(null)

  function clear() {
    errors.value = {}
    formMessage.value = null
  }

  /** Puts the first message for each known field beside it; returns true if any was placed. */
  function fromIssues(issues: readonly Issue[]): boolean {
    const found: Partial<Record<F, string>> = {}
    for (const issue of issues) {
      const field = issue.path[0]
      if (typeof field === 'string' && (fields as readonly string[]).includes(field) && !found[field as F]) {
        found[field as F] = issue.message
      }
    }
    errors.value = found
    return Object.keys(found).length > 0
  }

  /** Shows a failed request: the server's field issues beside the fields, its message above the form. */
  function fromError(err: unknown, fallback = 'That did not work. Try again.') {
    if (err instanceof ApiError) {
      fromIssues(asIssues(err.issues))
      formMessage.value = err.message
    } else {
      formMessage.value = err instanceof Error && err.message ? err.message : fallback
    }
  }

  /** The parse of a form's body: its data, or null with the issues put beside their fields. */
  function checked<T>(parsed: Parsed<T>): T | null {
    if (parsed.success) return parsed.data
    fromIssues(parsed.error.issues)
    return null
  }

  /**
   * A form that sets a password: the parse of its body (issues go beside their fields), then
   * the repeated password, which must equal the first. Returns the body, or null when not valid.
   */
  function checkedWithRepeat<T>(parsed: Parsed<T>, password: string, repeat: string): T | null {
    if (!parsed.success) return checked(parsed)
    if (repeat !== password) {
      fromIssues([{ path: ['repeat'], message: 'The two passwords differ.' }])
      return null
    }
    return parsed.data
  }

  return { errors, formMessage, clear, fromIssues, fromError, checked, checkedWithRepeat }
}

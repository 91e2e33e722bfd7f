import { type Ref, ref } from 'vue'
import { idSchema } from '../../shared/schemas/common'
import { ApiError } from '@/api/client'
import { useErrorReporter } from '@/composables/useErrorReporter'

/**
 * The request bookkeeping every store repeats: a flag while a request is out, the last error
 * in `error`, and the one reporter. `read` is for loads: a failure is reported and kept, and
 * the call resolves to undefined. `submit` is for changes made from a form: the server's
 * message is kept (not shown as a toast, since it belongs beside the fields) and the error is
 * thrown on for the form to show.
 */
export function useRequestState() {
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()

  async function read<T>(
    flag: Ref<boolean> | null,
    context: string,
    work: () => Promise<T>,
    options: {
      /** Set instead of reporting when the server answers 404 (absent, or another firm's). */
      missing?: Ref<boolean>
      /** The id asked for: one that cannot be an id (a mistyped link) is missing without asking. */
      id?: string
    } = {},
  ): Promise<T | undefined> {
    error.value = null
    if (options.missing) {
      options.missing.value = options.id !== undefined && !idSchema.safeParse(options.id).success
      if (options.missing.value) return undefined
    }
    if (flag) flag.value = true
    try {
      return await work()
    } catch (err) {
      if (options.missing && err instanceof ApiError && err.status === 404) {
        options.missing.value = true
        error.value = err.message
      } else {
        error.value = report(err, context)
      }
      return undefined
    } finally {
      if (flag) flag.value = false
    }
  }

  async function submit<T>(flag: Ref<boolean> | null, work: () => Promise<T>): Promise<T> {
    if (flag) flag.value = true
    error.value = null
    try {
      return await work()
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      throw err
    } finally {
      if (flag) flag.value = false
    }
  }

  return { error, report, read, submit }
}

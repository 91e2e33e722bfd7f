import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import { ApiError } from '@/api/client'
import { acceptInvitation as acceptInvitationRequest } from '@/api/invitations'
import * as sessionApi from '@/api/session'
import type { Role, SessionInfo, SignInInput } from '@/api/session'
import type { AcceptInvitationBody } from '../../shared/schemas/invitations'
import { useErrorReporter } from '@/composables/useErrorReporter'
import { type Action, type WorkForEditing, may as mayTake, mayEditWork } from '../../shared/permissions'

/**
 * The signed-in member: who, in which firm, with which roles. `load()` asks the
 * server once per page load (the router guard calls it); a 401 there simply
 * means "signed out" and is not reported as an error.
 */
export const useSessionStore = defineStore('session', () => {
  const user = ref<SessionInfo['user'] | null>(null)
  const firm = ref<SessionInfo['firm'] | null>(null)
  const roles = ref<Role[]>([])
  const loading = ref(false)
  const error = ref<string | null>(null)
  /** True once `load()` has heard from the server (signed in or not). */
  const loaded = ref(false)
  const { report } = useErrorReporter()

  const signedIn = computed(() => user.value !== null)

  /** Whether the signed-in member may take `action` (shared/permissions.ts). */
  function may(action: Action): boolean {
    return mayTake(roles.value, action)
  }

  /** Whether the signed-in member may change a run or comparison in its review state now. */
  function mayEdit(work: WorkForEditing): boolean {
    return user.value !== null && mayEditWork({ userId: user.value.id, roles: roles.value }, work)
  }

  function apply(info: SessionInfo | null) {
    user.value = info?.user ?? null
    firm.value = info?.firm ?? null
    roles.value = info?.roles ?? []
  }

  let pending: Promise<void> | null = null

  /** Finds out who is signed in; concurrent callers share one request. */
  function load(): Promise<void> {
    pending ??= (async () => {
      loading.value = true
      error.value = null
      try {
        apply(await sessionApi.getMe())
      } catch (err) {
        apply(null)
        if (!(err instanceof ApiError && err.status === 401)) error.value = report(err)
      } finally {
        loaded.value = true
        loading.value = false
        pending = null
      }
    })()
    return pending
  }

  /**
   * Runs a request that answers with a new session (sign-in, accepting an
   * invitation). On failure the ApiError is thrown on, so the form can show the
   * server's field issues, and its message stays in `error` (no toast: the
   * message belongs beside the fields).
   */
  async function startSession(request: () => Promise<SessionInfo>): Promise<void> {
    loading.value = true
    error.value = null
    try {
      apply(await request())
      loaded.value = true
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      throw err
    } finally {
      loading.value = false
    }
  }

  /** Signs in with e-mail and password. */
  function signIn(input: SignInInput): Promise<void> {
    return startSession(() => sessionApi.signIn(input))
  }

  /** Accepts an invitation, which creates the member and signs them in. */
  function acceptInvitation(token: string, body: AcceptInvitationBody): Promise<void> {
    return startSession(() => acceptInvitationRequest(token, body))
  }

  async function signOut(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      await sessionApi.signOut()
    } catch (err) {
      if (!(err instanceof ApiError && err.status === 401)) error.value = report(err)
    } finally {
      apply(null)
      loading.value = false
    }
  }

  return {
    user,
    firm,
    roles,
    loading,
    error,
    loaded,
    signedIn,
    may,
    mayEdit,
    load,
    signIn,
    acceptInvitation,
    signOut,
  }
})

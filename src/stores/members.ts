import { defineStore } from 'pinia'
import { ref } from 'vue'
import { ApiError } from '@/api/client'
import * as invitationsApi from '@/api/invitations'
import type { Invitation } from '@/api/invitations'
import * as membersApi from '@/api/members'
import type { FirmMember } from '@/api/members'
import { useRequestState } from '@/composables/useRequestState'
import type { Role } from '../../shared/schemas/accounts'
import type { CreateInvitationBody } from '../../shared/schemas/invitations'

/**
 * The firm's members and pending invitations, for admins. Actions whose form shows the
 * server's answer beside its fields (invite, change roles) throw the ApiError on; the
 * others report it through the one reporter.
 */
export const useMembersStore = defineStore('members', () => {
  const members = ref<FirmMember[]>([])
  const invitations = ref<Invitation[]>([])
  const loading = ref(false)
  const saving = ref(false)
  const { error, report, read } = useRequestState()

  async function load(): Promise<void> {
    await read(loading, 'Could not load the members', async () => {
      const [m, i] = await Promise.all([membersApi.listMembers(), invitationsApi.listInvitations()])
      members.value = m
      invitations.value = i
    })
  }

  /** Runs a change; a form-level failure keeps its message in `error` and is thrown on for the form. */
  async function save<T>(work: () => Promise<T>, reportHere: boolean): Promise<T> {
    saving.value = true
    error.value = null
    try {
      return await work()
    } catch (err) {
      error.value = reportHere || !(err instanceof ApiError) ? report(err) : err.message
      throw err
    } finally {
      saving.value = false
    }
  }

  /** Sends an invitation; a newer one to the same address replaces the older. */
  function invite(body: CreateInvitationBody): Promise<Invitation> {
    return save(async () => {
      const invitation = await invitationsApi.createInvitation(body)
      invitations.value = [...invitations.value.filter((i) => i.email !== invitation.email), invitation]
      return invitation
    }, false)
  }

  function changeRoles(id: string, roles: Role[]): Promise<FirmMember> {
    return save(async () => {
      const updated = await membersApi.updateMemberRoles(id, roles)
      members.value = members.value.map((m) => (m.id === id ? updated : m))
      return updated
    }, false)
  }

  function remove(id: string): Promise<void> {
    return save(async () => {
      await membersApi.removeMember(id)
      members.value = members.value.filter((m) => m.id !== id)
    }, true)
  }

  function revoke(id: string): Promise<void> {
    return save(async () => {
      await invitationsApi.revokeInvitation(id)
      invitations.value = invitations.value.filter((i) => i.id !== id)
    }, true)
  }

  return { members, invitations, loading, saving, error, load, invite, changeRoles, remove, revoke }
})

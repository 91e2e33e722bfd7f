import type { Role } from './schemas/accounts.js'
import type { ReviewState } from './vocabulary/reviewStates.js'

/**
 * Who may do what: the one table the server's middleware, the router's guards, the views'
 * visibility checks and the route-table test all read. Routes name an action from here, never
 * a list of roles. `what` finishes the sentence "This needs … to …" in a refusal.
 *
 * Reading is open to every member of the firm and is not listed; an admin does the work of
 * engineers and checkers only when also holding their role.
 */
export const PERMISSIONS = {
  'members.manage': { roles: ['admin'], what: 'manage the firm’s members and invitations' },
  'credits.buy': { roles: ['admin'], what: 'buy credits and see the firm’s purchases' },
  'projects.manage': { roles: ['engineer', 'checker'], what: 'create or change projects' },
  'records.upload': { roles: ['engineer', 'checker'], what: 'upload records and change their details' },
  /** Deleting a record someone else uploaded (the uploader may always delete their own). */
  'records.removeAny': { roles: ['admin'], what: 'delete a record another member uploaded' },
  'pairs.manage': { roles: ['engineer', 'checker'], what: 'make or remove record pairs' },
  'runs.start': { roles: ['engineer', 'checker'], what: 'start runs' },
  'targets.create': { roles: ['engineer', 'checker'], what: 'save target spectra' },
  'comparisons.create': { roles: ['engineer', 'checker'], what: 'create comparisons' },
  /** Changing a saved comparison also depends on its review state: see WORK_EDITING. */
  'comparisons.edit': { roles: ['engineer', 'checker'], what: 'change comparisons' },
  'reviews.submit': { roles: ['engineer'], what: 'submit work for checking' },
  'reviews.decide': { roles: ['checker'], what: 'mark work checked or return it' },
  'reviews.comment': { roles: ['engineer', 'checker'], what: 'comment in a review thread' },
} as const satisfies Record<string, { roles: readonly Role[]; what: string }>

export type Action = keyof typeof PERMISSIONS

export const ACTIONS = Object.keys(PERMISSIONS) as Action[]

/** The roles of which a member needs one to take `action`. */
export function rolesFor(action: Action): readonly Role[] {
  return PERMISSIONS[action].roles
}

/** Whether a member holding `roles` may take `action`. */
export function may(roles: readonly Role[], action: Action): boolean {
  return rolesFor(action).some((r) => roles.includes(r))
}

/** The refusal for a member who may not take `action`, naming the roles it needs. */
export function refusalFor(action: Action): string {
  const roles = rolesFor(action)
  const needed = roles.length === 1 ? `the ${roles[0]} role` : `the ${roles.join(' or ')} role`
  return `This needs ${needed}: only they may ${PERMISSIONS[action].what}.`
}

/**
 * Review work (runs and comparisons): in which review states each role may change it, and
 * whether only work the member made. Submitted work waits for a decision and checked work is
 * locked (a change is a new revision), so nobody edits those. A checker never edits work that
 * someone else made, so the work they sign off is the work its author made.
 */
export const WORK_EDITING: Readonly<Record<Role, { states: readonly ReviewState[]; ownWorkOnly: boolean }>> =
  {
    engineer: { states: ['draft', 'returned'], ownWorkOnly: false },
    checker: { states: ['draft'], ownWorkOnly: true },
    admin: { states: [], ownWorkOnly: true },
  }

export interface WorkForEditing {
  state: ReviewState
  /** The member who made the work. */
  createdBy: string
}

/** Whether a member may change a piece of review work now. */
export function mayEditWork(
  member: { userId: string; roles: readonly Role[] },
  work: WorkForEditing,
): boolean {
  return member.roles.some((role) => {
    const rule = WORK_EDITING[role]
    return rule.states.includes(work.state) && (!rule.ownWorkOnly || work.createdBy === member.userId)
  })
}

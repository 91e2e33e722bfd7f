import { describe, expect, it } from 'vitest'
import { ACTIONS, PERMISSIONS, may, mayEditWork, refusalFor } from './permissions.js'
import { REVIEW_STATES } from './vocabulary/reviewStates.js'

const ME = 'member-1'
const OTHER = 'member-2'

describe('the permissions table', () => {
  it('names at least one role for every action, and its refusal names each of them', () => {
    for (const action of ACTIONS) {
      expect(PERMISSIONS[action].roles.length, action).toBeGreaterThan(0)
      for (const role of PERMISSIONS[action].roles) expect(refusalFor(action)).toContain(role)
    }
  })

  it('gives an admin no engineering work unless they hold that role too', () => {
    expect(may(['admin'], 'runs.start')).toBe(false)
    expect(may(['admin', 'engineer'], 'runs.start')).toBe(true)
    expect(may(['admin'], 'members.manage')).toBe(true)
  })
})

describe('who may change review work in each state', () => {
  const edits = (
    roles: ('engineer' | 'checker' | 'admin')[],
    state: (typeof REVIEW_STATES)[number],
    own: boolean,
  ) => mayEditWork({ userId: ME, roles }, { state, createdBy: own ? ME : OTHER })

  it('nobody changes submitted or checked work', () => {
    for (const state of ['submitted', 'checked'] as const) {
      for (const own of [true, false]) expect(edits(['engineer', 'checker', 'admin'], state, own)).toBe(false)
    }
  })

  it('an engineer changes drafts and returned work', () => {
    expect(edits(['engineer'], 'draft', false)).toBe(true)
    expect(edits(['engineer'], 'returned', true)).toBe(true)
  })

  it('a checker changes only drafts they made, never returned work', () => {
    expect(edits(['checker'], 'draft', true)).toBe(true)
    expect(edits(['checker'], 'draft', false)).toBe(false)
    expect(edits(['checker'], 'returned', true)).toBe(false)
    expect(edits(['checker'], 'returned', false)).toBe(false)
  })

  it('an admin alone changes nothing', () => {
    for (const state of REVIEW_STATES) expect(edits(['admin'], state, true)).toBe(false)
  })
})

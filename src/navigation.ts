import { type Action, may } from '../shared/permissions.js'
import type { Role } from '../shared/schemas/accounts.js'

/**
 * One entry of the main navigation. Add a page to the navigation with one
 * line here (after adding its route in src/router/index.ts with the same
 * `action` in its `meta`). Who may take an action is in shared/permissions.ts.
 */
export interface NavEntry {
  /** The path the entry opens. */
  to: string
  label: string
  /** Only members who may take this action see the entry; every signed-in member when omitted. */
  action?: Action
  /** SVG path data on a 20 × 20 grid, stroked in the text colour. */
  iconPath?: string
}

export const navigation: NavEntry[] = [
  { to: '/', label: 'Workspace', iconPath: 'M3 17V3M3 17h14M5 14c3-1 4-9 6-9s3 6 6 7' },
  { to: '/records', label: 'Records', iconPath: 'M2 10h3l2-5 2 10 2-8 2 6 1.5-3H18' },
  { to: '/pairs', label: 'Pairs', iconPath: 'M2 8h3l2-4 2 8 2-5 2 3h5M2 15h3l2-3 2 5 2-6 2 4h5' },
  { to: '/runs', label: 'Runs', iconPath: 'M3 16c2-9 4-12 6-12s3 5 4 8 2 4 4 4M3 17h14' },
  {
    to: '/comparisons',
    label: 'Comparisons',
    iconPath: 'M3 17V3M3 17h14M5 13c2-5 4-8 6-8s3 4 6 5M5 15c2-3 4-5 6-5s3 2 6 2',
  },
  { to: '/reviews', label: 'Checking', iconPath: 'M4 3h12v14H4zM7 10l2 2 4-5' },
  { to: '/projects', label: 'Projects', iconPath: 'M2 5h6l2 2h8v10H2z' },
  { to: '/credits', label: 'Credits', iconPath: 'M3 6h14v9H3zM3 9h14M6 12.5h3' },
  {
    to: '/members',
    label: 'Members',
    action: 'members.manage',
    iconPath:
      'M7 9a3 3 0 1 0 0-6 3 3 0 0 0 0 6M2 17c0-3 2.2-5 5-5s5 2 5 5M13 4.5a2.5 2.5 0 0 1 0 5M15 12c1.8.6 3 2.4 3 5',
  },
  {
    to: '/account',
    label: 'Account',
    iconPath: 'M10 9a3.5 3.5 0 1 0 0-7 3.5 3.5 0 0 0 0 7M3 18c0-4 3-6 7-6s7 2 7 6',
  },
]

/** The entries a member holding `roles` may use, in navigation order. */
export function navigationFor(roles: readonly Role[]): NavEntry[] {
  return navigation.filter((e) => !e.action || may(roles, e.action))
}

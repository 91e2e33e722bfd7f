import type { Role } from '../../../shared/schemas/accounts'

/** What each role allows, in the words of the access table every page follows. */
export const ROLE_SUMMARIES: { role: Role; label: string; summary: string }[] = [
  { role: 'engineer', label: 'Engineer', summary: 'uploads records, starts runs, submits work for checking' },
  { role: 'checker', label: 'Checker', summary: "reviews the firm's work and marks it checked" },
  { role: 'admin', label: 'Admin', summary: 'manages members and buys credits' },
]

const LABELS = Object.fromEntries(ROLE_SUMMARIES.map((r) => [r.role, r.label])) as Record<Role, string>

export function roleLabel(role: Role): string {
  return LABELS[role]
}

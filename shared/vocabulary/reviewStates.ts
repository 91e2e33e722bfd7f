import { z } from 'zod'

/**
 * Where a run or comparison stands in checking: draft (never submitted) → submitted →
 * checked, or returned with comments and then submitted again.
 */
export const REVIEW_STATES = ['draft', 'submitted', 'returned', 'checked'] as const
export type ReviewState = (typeof REVIEW_STATES)[number]

/** The states a stored review row can be in: a draft has no row. */
export const STORED_REVIEW_STATES = ['submitted', 'returned', 'checked'] as const
export type StoredReviewState = (typeof STORED_REVIEW_STATES)[number]

export const reviewStateSchema = z.enum(REVIEW_STATES)

/** What a checker decides on submitted work. */
export const REVIEW_DECISIONS = ['checked', 'returned'] as const satisfies readonly StoredReviewState[]
export type ReviewDecision = (typeof REVIEW_DECISIONS)[number]

/** The one wording of each state: `label` on badges and lists, `sheetLabel` in a sheet's review block. */
export const REVIEW_STATE_LABELS: Readonly<Record<ReviewState, { label: string; sheetLabel: string }>> = {
  draft: { label: 'Draft', sheetLabel: 'Draft, not submitted' },
  submitted: { label: 'Awaiting check', sheetLabel: 'Submitted, awaiting check' },
  returned: { label: 'Returned', sheetLabel: 'Returned with comments' },
  checked: { label: 'Checked', sheetLabel: 'Checked' },
}

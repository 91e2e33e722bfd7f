import type { DataTableColumn } from 'naive-ui'
import { h } from 'vue'
import { RouterLink } from 'vue-router'
import type { ReviewState } from '@/api/reviews'
import ReviewStateBadge from '@/components/reviews/ReviewStateBadge.vue'
import { formatDateTime } from '@/formatDateTime'

/**
 * Columns that many list tables share, written once: a date that sorts newest first, a name
 * that opens the row's own page (styled by ListTable's `row-link`), and where a piece of work
 * stands in checking.
 */
export function dateColumn<T>(
  title: string,
  key: string,
  at: (row: T) => number,
  extra: Partial<DataTableColumn<T>> = {},
): DataTableColumn<T> {
  return {
    title,
    key,
    sorter: (a: T, b: T) => at(a) - at(b),
    defaultSortOrder: 'descend',
    render: (row: T) => formatDateTime(at(row)),
    ...extra,
  } as DataTableColumn<T>
}

export function linkColumn<T>(
  title: string,
  key: string,
  to: (row: T) => string,
  text: (row: T) => string,
): DataTableColumn<T> {
  return {
    title,
    key,
    sorter: (a: T, b: T) => text(a).localeCompare(text(b)),
    render: (row: T) => h(RouterLink, { to: to(row), class: 'row-link' }, () => text(row)),
  } as DataTableColumn<T>
}

/** Work that waits for a checker first, then work returned, drafts, and last what is checked. */
const REVIEW_ORDER: Record<ReviewState, number> = { submitted: 0, returned: 1, draft: 2, checked: 3 }

export function reviewColumn<T>(
  title: string,
  key: string,
  state: (row: T) => ReviewState,
): DataTableColumn<T> {
  return {
    title,
    key,
    sorter: (a: T, b: T) => REVIEW_ORDER[state(a)] - REVIEW_ORDER[state(b)],
    render: (row: T) => h(ReviewStateBadge, { state: state(row) }),
  } as DataTableColumn<T>
}

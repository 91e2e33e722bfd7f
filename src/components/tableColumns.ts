import type { DataTableColumn } from 'naive-ui'
import { h } from 'vue'
import { RouterLink } from 'vue-router'
import { formatDateTime } from '@/formatDateTime'

/**
 * Columns that many list tables share, written once: a date that sorts newest first, and a
 * name that opens the row's own page (styled by ListTable's `row-link`).
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

/** A timestamp (ms) as the reader's local date and time, e.g. "2 Dec 2026, 14:05". */
export function formatDateTime(ms: number): string {
  return new Date(ms).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' })
}

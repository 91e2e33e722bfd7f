/** One line of a workspace box: a link, and a line of detail under it. */
export interface WorkItem {
  key: string
  to: string
  title: string
  detail: string
}

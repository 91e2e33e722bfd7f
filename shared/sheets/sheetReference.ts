import type { Sheet } from '../schemas/sheets.js'

/**
 * "ORD-R-3F2A9C1B": the kind of sheet and the first eight hex digits of the subject's id. It is
 * printed on the run's sheet, and the same tag tells two runs of one record apart in a
 * comparison's legend and in the run picker, so each label can be traced to its sheet.
 */
export function sheetReference(kind: Sheet['kind'], id: string): string {
  return `ORD-${kind === 'run' ? 'R' : 'C'}-${id.replace(/-/g, '').slice(0, 8).toUpperCase()}`
}

import { type Sheet, sheetSchema } from '../../shared/schemas/sheets'
import { apiRequest } from './client'

export type ExportSubject = 'run' | 'comparison'
export type ExportFormat = 'pdf' | 'png' | 'svg' | 'csv'

const BASE: Record<ExportSubject, string> = { run: '/api/runs', comparison: '/api/comparisons' }

/** The calc-package sheet of a run or comparison, as the PDF lays it out. */
export function getSheet(subject: ExportSubject, id: string, signal?: AbortSignal): Promise<Sheet> {
  return apiRequest(`${BASE[subject]}/${encodeURIComponent(id)}/sheet`, sheetSchema, { signal })
}

/**
 * Where to download an export. A plain same-origin GET: the browser saves it under the
 * server's file name (Content-Disposition) and the session cookie authorises it.
 */
export function exportUrl(
  subject: ExportSubject,
  id: string,
  format: ExportFormat,
  widthMm?: number,
): string {
  const path = `${BASE[subject]}/${encodeURIComponent(id)}/export.${format}`
  return format === 'png' && widthMm !== undefined
    ? `${path}?widthMm=${encodeURIComponent(String(widthMm))}`
    : path
}

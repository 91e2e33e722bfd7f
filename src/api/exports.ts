import { type Sheet, sheetSchema } from '../../shared/schemas/sheets'
import { apiRequest } from './client'

export type ExportSubject = 'run' | 'comparison'
export type ExportFormat = 'pdf' | 'png' | 'svg' | 'csv'

const BASE: Record<ExportSubject, string> = { run: '/api/runs', comparison: '/api/comparisons' }

/** The calc-package sheet of a run or comparison, as the PDF lays it out. */
export function getSheet(subject: ExportSubject, id: string, signal?: AbortSignal): Promise<Sheet> {
  return apiRequest(`${BASE[subject]}/${encodeURIComponent(id)}/sheet`, sheetSchema, { signal })
}

/** The view of a plot export: what the engineer has on screen. */
export interface PlotView {
  quantity?: string
  unit?: string
  xScale?: 'log' | 'linear'
  yScale?: 'log' | 'linear'
  /** Comparisons: records drawn scaled (true) or as recorded. */
  scaled?: boolean
  /** The four-way log plot instead of the spectrum chart (in the PDF sheet too). */
  chart?: 'tripartite'
}

/**
 * Where to download an export. A plain same-origin GET: the browser saves it under the
 * server's file name (Content-Disposition) and the session cookie authorises it. The plot
 * formats take the on-screen view, and the PNG a printed width.
 */
export function exportUrl(
  subject: ExportSubject,
  id: string,
  format: ExportFormat,
  options: { widthMm?: number; view?: PlotView } = {},
): string {
  const path = `${BASE[subject]}/${encodeURIComponent(id)}/export.${format}`
  const params = new URLSearchParams()
  if (format === 'png' && options.widthMm !== undefined) params.set('widthMm', String(options.widthMm))
  if (format === 'pdf' && options.view?.chart) params.set('chart', options.view.chart)
  if (format === 'png' || format === 'svg') {
    for (const [key, value] of Object.entries(options.view ?? {})) {
      if (value !== undefined) params.set(key, String(value))
    }
  }
  const query = params.toString()
  return query ? `${path}?${query}` : path
}

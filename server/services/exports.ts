/**
 * Calc-package exports of runs and comparisons: the sheet model, and the PDF, PNG, SVG and
 * CSV files made from it. Firm-scoped (another firm's id answers 404) and recorded in the
 * audit log, with a digest of the file handed out.
 */
import { decodeRunSettings, decodeSpectrumResult, parseStored } from '../db/parseStored.js'
import { fileUnitOf } from '../../shared/charts/unitSystems.js'
import type { UnitSystem } from '../../shared/schemas/me.js'
import { createHash } from 'node:crypto'
import { aliasedTable, and, eq } from 'drizzle-orm'
import { z } from 'zod'
import {
  DEFAULT_COMPARISON_CHART_VIEW,
  comparisonChartInput,
} from '../../shared/charts/comparisonChartInput.js'
import { DEFAULT_SPECTRUM_VIEW } from '../../shared/charts/runSpectrumChartInput.js'
import { asTripartite, chartSvg } from '../../shared/charts/chartSvg.js'
import { TRIPARTITE_UNITS } from '../../shared/charts/tripartiteChart.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import type { ComparisonView } from '../../shared/schemas/comparisons.js'
import type { SpectrumResult } from '../../shared/schemas/spectrum.js'
import type { PlotExportQuery, Sheet, SpectrumChartInput } from '../../shared/schemas/sheets.js'
import type { Db } from '../db/client.js'
import { firms, projects, recordPairs, records, reviews, runs, spectra, users } from '../db/schema.js'
import { renderChartPng } from '../exports/chartPng.js'
import { buildComparisonSheetFromFacts } from '../exports/comparisonSheet.js'
import { comparisonOrdinatesCsv, runOrdinatesCsv, sheetCsvAbout } from '../exports/ordinatesCsv.js'
import { type SheetRecordFacts, buildRunSheetFromFacts } from '../exports/runSheet.js'
import { renderSheetPdf } from '../exports/sheetPdf.js'
import { type ReviewFacts, ordinateVersion } from '../exports/sheetParts.js'
import { badRequest, conflict, notFound } from '../httpError.js'
import type { Member } from '../middleware/auth.js'
import { recordSummaryColumns } from '../runs/recordSummaryColumns.js'
import { runSpectrumChartInputWithBand } from '../../shared/charts/withUsableBand.js'
import { usablePeriodLimit } from '../../shared/spectra/processing/describeProcessing.js'
import { recordAudit } from './audit.js'
import { decodeRecordProcessing } from './recordProcessing.js'
import { fileUnits } from './me.js'
import { getComparisonView } from './comparisons.js'

export type ExportFormat = 'pdf' | 'png' | 'svg' | 'csv'
export type ExportSubject = 'run' | 'comparison'

export interface ExportFile {
  /** Text formats travel as strings, so Express states their charset. */
  body: Buffer | string
  contentType: string
  fileName: string
}

/** The warnings of a stored spectrum, which is all a comparison sheet reads of it. */
const spectrumWarningsSchema = z.object({ warnings: z.array(z.string()).optional() })

/** A record's parameters (as its spectrum states them) and what the sheet says of its file. */
const recordFactColumns = {
  ...recordSummaryColumns,
  name: records.name,
  component: records.component,
  sourceFileName: records.sourceFileName,
  sha256: records.sha256,
  format: records.format,
  synthetic: records.synthetic,
  processing: records.processing,
}

function recordFacts(db: Db, firmId: string, recordId: string): SheetRecordFacts {
  const row = db
    .select(recordFactColumns)
    .from(records)
    .where(and(eq(records.firmId, firmId), eq(records.id, recordId)))
    .get()
  if (!row) throw notFound('The record of this run')
  return { ...row, processing: decodeRecordProcessing(row.processing) }
}

/** The review of a run or comparison, with the checker's name; null when never submitted. */
function reviewFacts(db: Db, subjectType: ExportSubject, subjectId: string): ReviewFacts | null {
  const row = db
    .select({
      state: reviews.state,
      submittedAt: reviews.submittedAt,
      decidedByName: users.name,
      decidedAt: reviews.decidedAt,
    })
    .from(reviews)
    .leftJoin(users, eq(users.id, reviews.decidedBy))
    .where(and(eq(reviews.subjectType, subjectType), eq(reviews.subjectId, subjectId)))
    .get()
  return row ?? null
}

/** A run's sheet and the spectrum it was built from. */
function loadRunSheet(
  db: Db,
  firmId: string,
  runId: string,
  units: UnitSystem = 'si',
): { sheet: Sheet; spectrum: SpectrumResult; subjectName: string; records: SheetRecordFacts[] } {
  const author = aliasedTable(users, 'author')
  const row = db
    .select({
      id: runs.id,
      status: runs.status,
      recordId: runs.recordId,
      pairId: runs.pairId,
      revision: runs.revision,
      settings: runs.settings,
      engineVersion: runs.engineVersion,
      createdAt: runs.createdAt,
      finishedAt: runs.finishedAt,
      createdByName: author.name,
      firmName: firms.name,
      projectName: projects.name,
      result: spectra.result,
    })
    .from(runs)
    .innerJoin(author, eq(author.id, runs.createdBy))
    .innerJoin(firms, eq(firms.id, runs.firmId))
    .innerJoin(projects, eq(projects.id, runs.projectId))
    .leftJoin(spectra, eq(spectra.runId, runs.id))
    .where(and(eq(runs.firmId, firmId), eq(runs.id, runId)))
    .get()
  if (!row) throw notFound('The run')
  if (row.status !== 'succeeded' || !row.result) {
    throw conflict('Only a run that has succeeded has a spectrum to export.', 'run_not_finished')
  }
  const { subjectName, records: recordList } = runRecords(db, firmId, row)
  const spectrum = decodeSpectrumResult(row.result)
  const sheet = buildRunSheetFromFacts({
    productVersion: ordinateVersion(),
    firmName: row.firmName,
    projectName: row.projectName,
    run: {
      id: row.id,
      revision: row.revision,
      settings: decodeRunSettings(row.settings),
      engineVersion: row.engineVersion,
      createdByName: row.createdByName,
      createdAt: row.createdAt,
      finishedAt: row.finishedAt,
    },
    records: recordList,
    subjectName,
    spectrum,
    methods: [spectrum.methodStatement],
    spectrumWarnings: spectrum.warnings,
    review: reviewFacts(db, 'run', row.id),
    units,
  })
  return { sheet, spectrum, subjectName, records: recordList }
}

/** The record of a run, or the two records of a pair run, and the name the sheet gives it. */
function runRecords(
  db: Db,
  firmId: string,
  run: { recordId: string | null; pairId: string | null },
): { subjectName: string; records: SheetRecordFacts[] } {
  if (run.recordId) {
    const record = recordFacts(db, firmId, run.recordId)
    return { subjectName: record.name, records: [record] }
  }
  const pair = run.pairId
    ? db
        .select()
        .from(recordPairs)
        .where(and(eq(recordPairs.firmId, firmId), eq(recordPairs.id, run.pairId)))
        .get()
    : undefined
  if (!pair) throw notFound('The records of this run')
  return {
    subjectName: pair.name,
    records: [recordFacts(db, firmId, pair.record1Id), recordFacts(db, firmId, pair.record2Id)],
  }
}

/** The sheet of one of the firm's runs; 404 for another firm's run, 409 before it succeeds. */
export function buildRunSheet(db: Db, firmId: string, runId: string, units: UnitSystem = 'si'): Sheet {
  return loadRunSheet(db, firmId, runId, units).sheet
}

/** A comparison's sheet and the view it was built from. */
function loadComparisonSheet(db: Db, firmId: string, id: string): { sheet: Sheet; view: ComparisonView } {
  const view = getComparisonView(db, firmId, id)
  const names = db
    .select({ firmName: firms.name, projectName: projects.name })
    .from(projects)
    .innerJoin(firms, eq(firms.id, projects.firmId))
    .where(and(eq(projects.firmId, firmId), eq(projects.id, view.comparison.projectId)))
    .get()
  if (!names) throw notFound('The project of this comparison')
  const recordsByRun = new Map<string, SheetRecordFacts[]>()
  const warningsByRun = new Map<string, string[]>()
  for (const curve of view.curves) {
    const run = db
      .select({ recordId: runs.recordId, pairId: runs.pairId, result: spectra.result })
      .from(runs)
      .leftJoin(spectra, eq(spectra.runId, runs.id))
      .where(and(eq(runs.firmId, firmId), eq(runs.id, curve.runId)))
      .get()
    if (!run) throw notFound(`The run ${curve.runId}`)
    recordsByRun.set(curve.runId, runRecords(db, firmId, run).records)
    warningsByRun.set(
      curve.runId,
      parseStored(spectrumWarningsSchema, run.result ?? {}, 'spectrum warnings').warnings ?? [],
    )
  }
  const sheet = buildComparisonSheetFromFacts({
    productVersion: ordinateVersion(),
    ...names,
    view,
    recordsByRun,
    warningsByRun,
    review: reviewFacts(db, 'comparison', id),
  })
  return { sheet, view }
}

/** The sheet of one of the firm's comparisons; 404 for another firm's. */
export function buildComparisonSheet(db: Db, firmId: string, id: string): Sheet {
  return loadComparisonSheet(db, firmId, id).sheet
}

/** A file name made only of the reference, revision and a plain-ASCII slug of the title. */
export function exportFileName(sheet: Sheet, format: ExportFormat): string {
  const slug = sheet.title
    .normalize('NFKD')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 48)
    .replace(/-+$/g, '')
  return `${sheet.reference}-rev${sheet.revision}${slug ? `-${slug}` : ''}.${format}`
}

/**
 * `?chart=tripartite`: the sheet and the plot files draw the four-way log plot of the same
 * curves (PSV for a run, the comparison's PSA for a comparison), its scales labelled in the
 * member's units.
 */
function loadTripartiteExport(
  db: Db,
  member: Member,
  subject: ExportSubject,
  id: string,
  query: PlotExportQuery,
): { sheet: Sheet; csv: () => string; chart: () => SpectrumChartInput } {
  if (query.quantity || query.unit || query.xScale || query.yScale) {
    throw badRequest(
      'The four-way log plot shows PSV, SD and PSA on fixed log axes; leave out quantity, unit and the scales.',
      'invalid_input',
    )
  }
  const units = TRIPARTITE_UNITS[query.units ?? 'si']
  const base = loadExport(db, member.firmId, subject, id, {
    ...query,
    chart: undefined,
    ...(subject === 'run' ? { quantity: 'PSV' as const } : {}),
  })
  const chart = asTripartite(base.chart(), units)
  return { ...base, sheet: { ...base.sheet, chart }, chart: () => chart }
}

/**
 * The sheet of a subject, its CSV of every ordinate, and its chart in the view asked for
 * (the sheet's own chart when the query names no view).
 */
function loadExport(
  db: Db,
  firmId: string,
  subject: ExportSubject,
  id: string,
  query: PlotExportQuery,
): { sheet: Sheet; csv: () => string; chart: () => SpectrumChartInput } {
  if (subject === 'run') {
    if (query.scaled !== undefined) throw badRequest('scaled applies to comparisons only.', 'invalid_input')
    const units = query.units ?? 'si'
    const { sheet, spectrum, subjectName, records: recordList } = loadRunSheet(db, firmId, id, units)
    return {
      sheet,
      csv: () =>
        runOrdinatesCsv({
          about: sheetCsvAbout(sheet),
          records: recordList,
          spectrum,
          gravityMPerS2: STANDARD_GRAVITY_M_PER_S2,
          units,
        }),
      chart: () =>
        runSpectrumChartInputWithBand(usablePeriodLimit(recordList), spectrum, subjectName, {
          quantity: query.quantity ?? DEFAULT_SPECTRUM_VIEW.quantity,
          // A quantity without a unit takes the quantity's default unit, as the chart does.
          // US customary files draw SD in in and SV, PSV in in/s unless a unit is asked for.
          unit:
            query.unit ??
            (query.quantity
              ? units === 'us'
                ? fileUnitOf(query.quantity, 'us')
                : undefined
              : DEFAULT_SPECTRUM_VIEW.unit),
          xScale: query.xScale ?? DEFAULT_SPECTRUM_VIEW.xScale,
          yScale: query.yScale ?? DEFAULT_SPECTRUM_VIEW.yScale,
        }),
    }
  }
  if ((query.quantity && query.quantity !== 'PSA') || (query.unit && query.unit !== 'g')) {
    throw badRequest('A comparison is plotted as PSA in g; choose only its axis scales.', 'invalid_input')
  }
  const { sheet, view } = loadComparisonSheet(db, firmId, id)
  return {
    sheet,
    csv: () => comparisonOrdinatesCsv(sheet, view),
    chart: () =>
      comparisonChartInput(view, {
        ...DEFAULT_COMPARISON_CHART_VIEW,
        ...(query.xScale ? { xScale: query.xScale } : {}),
        ...(query.yScale ? { yScale: query.yScale } : {}),
        ...(query.scaled !== undefined ? { scaled: query.scaled } : {}),
      }),
  }
}

/** Makes one export file and records it in the audit log. */
export async function exportSheet(
  db: Db,
  member: Member,
  subject: ExportSubject,
  id: string,
  format: ExportFormat,
  query: PlotExportQuery,
): Promise<ExportFile> {
  // Files follow the member's units unless the request names them (?units=si|us).
  const withUnits = { ...query, units: fileUnits(db, member, query.units) }
  const { sheet, csv, chart } =
    query.chart === 'tripartite'
      ? loadTripartiteExport(db, member, subject, id, withUnits)
      : loadExport(db, member.firmId, subject, id, withUnits)
  let file: Omit<ExportFile, 'fileName'>
  switch (format) {
    case 'pdf':
      file = { body: await renderSheetPdf(sheet), contentType: 'application/pdf' }
      break
    case 'png':
      file = { body: renderChartPng(chart(), query.widthMm), contentType: 'image/png' }
      break
    case 'svg':
      file = { body: chartSvg(chart()), contentType: 'image/svg+xml' }
      break
    case 'csv':
      file = { body: csv(), contentType: 'text/csv' }
      break
  }
  const fileName = exportFileName(sheet, format)
  recordAudit(db, {
    firmId: member.firmId,
    userId: member.userId,
    action: 'export.created',
    subjectType: subject,
    subjectId: id,
    detail: {
      format,
      fileName,
      reference: sheet.reference,
      revision: sheet.revision,
      bytes: Buffer.byteLength(file.body),
      sha256: createHash('sha256').update(file.body).digest('hex'),
      ...(format === 'png' ? { widthMm: query.widthMm } : {}),
      ...(format === 'png' || format === 'svg'
        ? {
            view: {
              quantity: query.quantity,
              unit: query.unit,
              xScale: query.xScale,
              yScale: query.yScale,
              scaled: query.scaled,
              chart: query.chart,
            },
          }
        : {}),
    },
  })
  return { ...file, fileName }
}

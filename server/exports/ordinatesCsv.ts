/**
 * Every ordinate of a run or a comparison as CSV: a few `#` lines saying what produced the
 * numbers, a header row, then one row per period (ascending). Numbers are written in full
 * (shortest round-trip form), so the file holds exactly what the API answers.
 */
import type { RecordProcessing } from '../../shared/schemas/processing.js'
import {
  describeProcessing,
  usableBandCautionFor,
} from '../../shared/spectra/processing/describeProcessing.js'
import { CAUTION } from '../../shared/cautions.js'
import { unitsStatement } from '../../shared/charts/unitSystems.js'
import type { ComparisonView } from '../../shared/schemas/comparisons.js'
import type { UnitSystem } from '../../shared/schemas/me.js'
import type { Sheet } from '../../shared/schemas/sheets.js'
import type { SpectrumResult } from '../../shared/schemas/spectrum.js'
import { METRES_PER_INCH } from '../../shared/spectra/units.js'
import { COMBINATION_LABELS } from '../../shared/vocabulary/combinations.js'

/**
 * A text cell: quoted when it holds a separator, and kept from being read as a formula by
 * a spreadsheet when it starts with = + - @ (OWASP, "CSV Injection").
 */
export function csvText(text: string): string {
  const safe = /^[=+\-@\t\r]/.test(text) ? `'${text}` : text
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe
}

const csvNumber = (value: number | null | undefined) =>
  value === null || value === undefined || !Number.isFinite(value) ? '' : String(value)

/** The lines a sheet's CSV opens with: product, title, reference and review, firm and project. */
export function sheetCsvAbout(sheet: Sheet): string[] {
  return [
    `${sheet.product.name} ${sheet.product.version}`,
    `${sheet.title}`,
    `${sheet.reference} revision ${sheet.revision}; ${sheet.dateLabel} ${sheet.dateText}; ${sheet.review.stateLabel}`,
    `${sheet.firmName}; ${sheet.projectName}`,
  ]
}

const comments = (lines: string[]) => lines.map((line) => `# ${line.replace(/[\r\n]+/g, ' ')}`)

function table(header: string[], rows: Array<Array<number | null | undefined>>): string[] {
  return [header.map(csvText).join(','), ...rows.map((row) => row.map(csvNumber).join(','))]
}

const finish = (lines: string[]) => `${lines.join('\r\n')}\r\n`

type OrdinateKey = 'sdM' | 'svMPerS' | 'saMPerS2' | 'psvMPerS' | 'psaMPerS2'
/** A column: its name (units in it), the spectrum's SI series, and how many SI units make one of the column's. */
type Column = readonly [name: string, key: OrdinateKey, siPerUnit: number]

/** SI files: every ordinate in SI, and PSA in g beside it. */
const SI_QUANTITIES = (gravityMPerS2: number): Column[] => [
  ['sd_m', 'sdM', 1],
  ['sv_m_per_s', 'svMPerS', 1],
  ['sa_m_per_s2', 'saMPerS2', 1],
  ['psv_m_per_s', 'psvMPerS', 1],
  ['psa_m_per_s2', 'psaMPerS2', 1],
  ['psa_g', 'psaMPerS2', gravityMPerS2],
]

/** US customary files: SD in inches, SV and PSV in in/s, SA and PSA in g. */
const US_QUANTITIES = (gravityMPerS2: number): Column[] => [
  ['sd_in', 'sdM', METRES_PER_INCH],
  ['sv_in_per_s', 'svMPerS', METRES_PER_INCH],
  ['sa_g', 'saMPerS2', gravityMPerS2],
  ['psv_in_per_s', 'psvMPerS', METRES_PER_INCH],
  ['psa_g', 'psaMPerS2', gravityMPerS2],
]

/** The record of a run, or one component of a pair run, as its CSV names it. */
export interface CsvRecord {
  name: string
  sha256: string
  /** The units the file was read in (every ordinate is converted to SI). */
  sourceUnits: string
  /** A processed record's processing chain; null or absent for a record as received. */
  processing?: RecordProcessing | null
}

export interface RunCsvInput {
  /** The opening lines: what the file is and whose (sheetCsvAbout, or the command line's own). */
  about: string[]
  records: CsvRecord[]
  spectrum: SpectrumResult
  gravityMPerS2: number
  /** The member's units (or the request's ?units=): SI by default, or US customary. */
  units?: UnitSystem
}

/** What produced the numbers, from the spectrum's method statement and warnings. */
function methodLines({ methodStatement: m, warnings }: SpectrumResult): string[] {
  const subSteps = m.subStepsMin === m.subStepsMax ? `${m.subStepsMin}` : `${m.subStepsMin}–${m.subStepsMax}`
  return [
    `Solver: ${m.solver}`,
    `Time step of the record: Δt = ${m.recordDtS} s; sub-steps per oscillator: ${subSteps}`,
    `Sub-step rule: ${m.subStepRule}`,
    `Initial conditions: ${m.initialConditions} Free-vibration tail: ${m.freeVibrationTail}`,
    ...(m.combinationRule ? [`Combination: ${m.combinationRule}`] : []),
    `Accuracy: ${m.accuracyTarget}`,
    `Engine: ${m.engineVersion} (${m.kernel} kernel)`,
    ...warnings.map((w) => `Warning: ${w}`),
  ]
}

/**
 * The one CSV of a run: `#` lines saying what produced the numbers (the record or both
 * components with their SHA-256 and source units, the method, the warnings, the caution), a
 * header row, then one row per period (ascending) with SD, SV, SA, PSV and PSA for every curve:
 * in SI with PSA in g beside it, or in US customary units (SD in in, SV and PSV in in/s, SA and
 * PSA in g), the units named in every column and stated in a `#` line. The export route, GET /api/runs/:id/spectrum.csv and the command line's
 * `--format csv` all write it.
 */
export function runOrdinatesCsv({
  about,
  records,
  spectrum,
  gravityMPerS2,
  units: unitSystem = 'si',
}: RunCsvInput): string {
  const periods = Array.from(spectrum.periodsS)
  const order = periods.map((_, i) => i).sort((a, b) => (periods[a] as number) - (periods[b] as number))
  const suffix = (c: SpectrumResult['curves'][number]) =>
    `_zeta${c.dampingRatio}${c.combination ? `_${COMBINATION_LABELS[c.combination]}` : ''}`
  const columns = unitSystem === 'us' ? US_QUANTITIES(gravityMPerS2) : SI_QUANTITIES(gravityMPerS2)
  const header = ['period_s']
  for (const curve of spectrum.curves) {
    for (const [name] of columns) header.push(`${name}${suffix(curve)}`)
  }
  const rows = order.map((i) => {
    const row: number[] = [periods[i] as number]
    for (const curve of spectrum.curves) {
      for (const [, key, perUnit] of columns) row.push((curve[key][i] as number) / perUnit)
    }
    return row
  })
  const units =
    records.length === 1
      ? `Source units: ${records[0]?.sourceUnits}, converted to m/s2`
      : `Source units: ${records.map((r) => `${r.name} ${r.sourceUnits}`).join('; ')}; each converted to m/s2`
  return finish([
    ...comments([
      ...about,
      `Record: ${records.map((r) => r.name).join(' + ')}; SHA-256 ${records.map((r) => r.sha256).join(' + ')}`,
      units,
      ...records.map(
        (r) =>
          `Processing${records.length > 1 ? ` of ${r.name}` : ''}: ${describeProcessing(r.processing, r.sourceUnits)}`,
      ),
      ...[usableBandCautionFor(records, spectrum.periodsS)].flatMap((c) => (c ? [`Warning: ${c}`] : [])),
      ...methodLines(spectrum),
      `${unitsStatement(unitSystem)} zeta is the damping ratio.`,
      `Caution: ${CAUTION}`,
    ]),
    ...table(header, rows),
  ])
}

/** Each record's PSA (g) as recorded and as scaled, the suite statistics and the target. */
export function comparisonOrdinatesCsv(sheet: Sheet, view: ComparisonView): string {
  const suite = view.suite.scaled ?? view.suite.unscaled
  const columns: Array<{ name: string; values: Array<number | null> }> = []
  for (const curve of view.curves) {
    columns.push({ name: `psa_g ${curve.label}`, values: curve.psaG })
    if (curve.scaleFactor !== null) {
      const factor = curve.scaleFactor
      columns.push({
        name: `psa_g scaled x${factor} ${curve.label}`,
        values: curve.psaG.map((v) => (v === null ? null : v * factor)),
      })
    }
  }
  columns.push({ name: `psa_g ${suite.label.replace(' ± 1σ', '')}`.toLowerCase(), values: suite.meanG })
  if (suite.lowerG && suite.upperG) {
    columns.push({ name: 'psa_g mean minus 1 sigma', values: suite.lowerG })
    columns.push({ name: 'psa_g mean plus 1 sigma', values: suite.upperG })
  }
  if (view.target) {
    columns.push({ name: `sa_g target ${view.target.label}`, values: view.target.saG })
    columns.push({ name: 'sa_g 90% of target', values: view.target.target90G })
  }
  const rows = view.periodsS.map((t, i) => [t, ...columns.map((c) => c.values[i])])
  return finish([
    ...comments([
      ...sheetCsvAbout(sheet),
      `${view.labels.damping}; ${view.labels.mean}${view.scaling ? `; ${view.scaling.ruleLabel} over ${view.scaling.fromS}-${view.scaling.toS} s` : ''}`,
      CAUTION,
    ]),
    ...table(['period_s', ...columns.map((c) => c.name)], rows),
  ])
}

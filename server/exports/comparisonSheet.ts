/**
 * The calc-package sheet of a comparison: the suite's records, the target and the scaling,
 * the chart of the comparison workspace, and the suite mean against the target at the
 * standard periods. Pure, like the run sheet: built from the comparison view
 * (getComparisonView) and facts already loaded.
 */
import { comparisonChartInput } from '../../shared/charts/comparisonChartInput.js'
import { formatSignificant } from '../../shared/charts/units.js'
import type { ComparisonView } from '../../shared/schemas/comparisons.js'
import type { Sheet, SheetField, SheetTable } from '../../shared/schemas/sheets.js'
import { STANDARD_PERIODS_S, ordinateAtPeriod } from '../../shared/sheets/ordinateAtPeriod.js'
import { type SheetRecordFacts, recordSection } from './runSheet.js'
import { type SheetOwnerFacts, SHEET_CAUTIONS, plainNumber as num, sheetHead } from './sheetParts.js'

export interface ComparisonSheetFacts extends SheetOwnerFacts {
  view: ComparisonView
  /** The records of each run of the comparison, by run id (two for a pair run). */
  recordsByRun: Map<string, SheetRecordFacts[]>
  /** The warnings stored with each run's spectrum (the record's and the computation's), by run id. */
  warningsByRun: Map<string, string[]>
}

const sig = (value: number, digits = 4) => formatSignificant(value, digits)
const NO_VALUE = '—'

function readAt(periodsS: number[], valuesG: Array<number | null>, periodS: number) {
  const reading = ordinateAtPeriod(
    periodsS,
    valuesG.map((v) => v ?? Number.NaN),
    periodS,
  )
  return reading.kind === 'outside' || !Number.isFinite(reading.value) ? null : reading
}

/** The suite mean, its band and the target at the standard periods, with mean/target. */
export function suiteOrdinateTable(view: ComparisonView): SheetTable {
  const suite = view.suite.scaled ?? view.suite.unscaled
  const scaled = view.suite.scaled !== null
  const columns = ['Period T (s)', scaled ? 'Scaled mean' : 'Mean']
  if (suite.lowerG && suite.upperG) columns.push('Mean − 1σ', 'Mean + 1σ')
  if (view.target) columns.push('Target', 'Mean / target')
  let interpolated = false
  let outside = false
  const rows = STANDARD_PERIODS_S.map((periodS) => {
    const mean = readAt(view.periodsS, suite.meanG, periodS)
    const readings = [mean]
    if (suite.lowerG && suite.upperG) {
      readings.push(
        readAt(view.periodsS, suite.lowerG, periodS),
        readAt(view.periodsS, suite.upperG, periodS),
      )
    }
    const target = view.target ? readAt(view.periodsS, view.target.saG, periodS) : null
    if (view.target) readings.push(target)
    const offGrid = readings.some((r) => r?.kind === 'interpolated')
    interpolated ||= offGrid
    outside ||= readings.some((r) => r === null)
    const cells = readings.map((r) => (r ? sig(r.value) : NO_VALUE))
    if (view.target)
      cells.push(mean && target && target.value > 0 ? sig(mean.value / target.value, 3) : NO_VALUE)
    return { label: `${periodS}${offGrid ? ' *' : ''}`, cells }
  })
  const notes = [
    `PSA in g at ${view.labels.damping}; ${suite.label.toLowerCase()}. Each record’s ordinates are in the CSV export.`,
  ]
  if (interpolated) {
    notes.push(
      '* Not on the comparison’s period grid: interpolated log-log (straight in ln T and ln PSA) between the neighbouring grid periods.',
    )
  }
  if (outside) notes.push('— Outside the period range of the suite or of the target: not extrapolated.')
  return { title: 'Suite mean and target at standard periods (PSA, g)', columns, rows, notes }
}

/** Each record's scale factor (or none), with the run it comes from. */
function scaleFactorTable(view: ComparisonView): SheetTable {
  return {
    title: 'Records of the suite and their scale factors',
    columns: ['Record', 'Run revision', 'Scale factor'],
    rows: view.curves.map((curve) => ({
      label: curve.label,
      cells: [String(curve.revision), curve.scaleFactor === null ? 'not scaled' : sig(curve.scaleFactor)],
    })),
    notes: view.scaling ? [view.scaling.ruleLabel] : ['No scaling: the records are compared as recorded.'],
  }
}

function targetFields(view: ComparisonView): SheetField[] {
  if (!view.target)
    return [{ label: 'Target spectrum', value: 'None: the records are compared with each other only.' }]
  return [
    { label: 'Target spectrum', value: view.target.label },
    ...view.target.notes.map((note) => ({ label: 'Target note', value: note })),
    {
      label: '90% of the target',
      value: view.scaling
        ? `Drawn over the scaling range ${view.scaling.fromS} s to ${view.scaling.toS} s`
        : 'Drawn over the whole period grid',
    },
  ]
}

function scalingFields(view: ComparisonView): SheetField[] {
  const fields: SheetField[] = [
    { label: 'Damping ratio', value: view.labels.damping },
    { label: 'Suite mean', value: view.labels.mean },
    { label: 'Period grid', value: view.labels.grid },
  ]
  if (view.labels.combination) fields.push({ label: 'Two components', value: view.labels.combination })
  if (!view.scaling) {
    fields.push({ label: 'Scaling', value: 'None' })
    return fields
  }
  const { check } = view.scaling
  fields.push(
    { label: 'Scaling rule', value: view.scaling.ruleLabel },
    { label: 'Scaling period range', value: `${view.scaling.fromS} s to ${view.scaling.toS} s` },
    {
      label: 'Suite check',
      value: `${check.passed ? 'Passes' : 'Does not pass'}: ${check.label}. Lowest ratio of the mean to the target ${num(
        check.minRatio,
        3,
      )} at T = ${num(check.governingPeriodS, 3)} s.`,
    },
    {
      label: 'What the check means',
      value:
        'A stated calculation, not a claim of compliance with a code clause; the engineer checks the adopted code.',
    },
  )
  return fields
}

export function buildComparisonSheetFromFacts(facts: ComparisonSheetFacts): Sheet {
  const { view } = facts
  const { comparison } = view
  const records = view.curves.flatMap((curve) =>
    (facts.recordsByRun.get(curve.runId) ?? []).map((record) => recordSection(record, true)),
  )
  return {
    ...sheetHead(facts, {
      kind: 'comparison',
      id: comparison.id,
      title: `Suite comparison: ${comparison.name}`,
      revision: comparison.revision,
      preparedByName: comparison.createdBy.name,
      doneAt: comparison.updatedAt ?? comparison.createdAt,
      doneVerb: 'saved',
    }),
    records,
    method: [
      {
        label: 'Spectra',
        value: `Each run’s stored spectrum (its own method statement is on the run’s sheet), PSA at ${view.labels.damping}`,
      },
      { label: 'Common period grid', value: view.labels.grid },
      {
        label: 'Between periods',
        value:
          'Curves on other grids are interpolated log-log onto the common grid; nothing is extrapolated.',
      },
      { label: 'Suite statistics', value: `${view.labels.mean}; σ with the sample (n − 1) denominator` },
    ],
    chart: comparisonChartInput(view),
    tables: [scaleFactorTable(view), suiteOrdinateTable(view)],
    comparison: { target: targetFields(view), scaling: scalingFields(view) },
    warnings: [
      ...view.suiteCautions,
      ...view.curves.flatMap((curve) =>
        (facts.warningsByRun.get(curve.runId) ?? []).map((w) => `${curve.label}: ${w}`),
      ),
    ],
    cautions: [...SHEET_CAUTIONS],
  }
}

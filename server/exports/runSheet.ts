/**
 * The calc-package sheet of one run, from facts already loaded (server/services/exports.ts
 * loads them). Pure: the same facts give the same sheet, which is what makes a checked
 * sheet reproducible.
 */
import {
  type RunSpectrumLike,
  type SpectrumView,
  DEFAULT_SPECTRUM_VIEW,
  runSpectrumChartInput,
} from '../../shared/charts/runSpectrumChartInput.js'
import { COMBINATION_LABELS } from '../../shared/vocabulary/combinations.js'
import { dampingLabel } from '../../shared/charts/spectrumChart.js'
import { FILE_UNITS, unitsStatement } from '../../shared/charts/unitSystems.js'
import { type DisplayUnit, formatSignificant, fromSI } from '../../shared/charts/units.js'
import { withUsableBand } from '../../shared/charts/withUsableBand.js'
import type { RecordProcessing } from '../../shared/schemas/processing.js'
import type { RunSettings } from '../../shared/schemas/runs.js'
import type { MethodStatement } from '../../shared/spectra/computeSpectrum.js'
import {
  describeProcessing,
  usableBandCautionFor,
  usablePeriodLimit,
} from '../../shared/spectra/processing/describeProcessing.js'
import { CAV_LABEL, type RecordParameters } from '../../shared/spectra/recordParameters.js'
import { SOURCE_UNIT_LABELS, STANDARD_GRAVITY_M_PER_S2, isSourceUnits } from '../../shared/spectra/units.js'
import type { Sheet, SheetField, SheetRecord, SheetTable } from '../../shared/schemas/sheets.js'
import { STANDARD_PERIODS_S, ordinateAtPeriod, peakOrdinate } from '../../shared/sheets/ordinateAtPeriod.js'
import { type SheetOwnerFacts, SHEET_CAUTIONS, plainNumber as num, sheetHead } from './sheetParts.js'
import type { UnitSystem } from '../../shared/schemas/me.js'

/** A record as the sheet describes it: its parameters and the columns of the records table it needs. */
export interface SheetRecordFacts extends RecordParameters {
  name: string
  component: string | null
  sourceFileName: string
  sha256: string
  format: string
  sourceUnits: string
  synthetic: boolean
  /** A processed record's processing chain; null or absent for a record as received. */
  processing?: RecordProcessing | null
}

/** The engine's statement of how it solved the oscillators. */
export type MethodFacts = Omit<MethodStatement, 'method' | 'newmarkGamma' | 'newmarkBeta' | 'kernel'> & {
  kernel: string
}

export interface RunSheetFacts extends SheetOwnerFacts {
  run: {
    id: string
    revision: number
    settings: RunSettings
    engineVersion: string | null
    createdByName: string
    createdAt: number
    finishedAt: number | null
  }
  /** One record, or the two components of a pair. */
  records: SheetRecordFacts[]
  /** The subject's name for titles and legends (the record's or the pair's). */
  subjectName: string
  spectrum: RunSpectrumLike
  /** One statement per computed record (two for a pair). */
  methods: MethodFacts[]
  /** The warnings stored with the spectrum: the record's (named, for a pair) and the computation's. */
  spectrumWarnings: string[]
  view?: SpectrumView
  /** The units the sheet states its values in (SI unless the member chose US customary). */
  units?: UnitSystem
}

const g = (valueMPerS2: number) => valueMPerS2 / STANDARD_GRAVITY_M_PER_S2
const sig = (value: number, digits = 4) => formatSignificant(value, digits)

/** "301 log-spaced periods from 0.01 s to 10 s (100 per decade), the default grid". */
export function periodGridStatement(settings: RunSettings): string {
  const periods = settings.periodsS
  const count = periods.length
  const lo = Math.min(...periods)
  const hi = Math.max(...periods)
  const span = `from ${num(lo)} s to ${num(hi)} s`
  if (settings.periodChoice === 'list') return `${count} periods as listed, ${span}`
  const decades = Math.log10(hi / lo)
  const perDecade = decades > 0 ? ` (${num((count - 1) / decades, 3)} per decade)` : ''
  const which = settings.periodChoice === 'default' ? ', the default grid' : ''
  return `${count} log-spaced periods ${span}${perDecade}${which}`
}

function processingStatement(units: string, processing?: RecordProcessing | null): string {
  if (processing) return describeProcessing(processing, units)
  return units === 'm/s²'
    ? 'None: read in m/s²; no baseline correction or filtering by Ordinate.'
    : `Converted from ${units} to m/s² (g = ${STANDARD_GRAVITY_M_PER_S2} m/s²); no baseline correction or filtering by Ordinate.`
}

/** A record parameter in a display unit, with the unit. */
const inUnits = (valueSI: number, unit: DisplayUnit) => `${num(fromSI(valueSI, unit))} ${unit}`

/**
 * A record as the sheet lists it. `compact` folds the parameters into a few lines, for
 * sheets that list a whole suite.
 */
export function recordSection(
  record: SheetRecordFacts,
  compact = false,
  system: UnitSystem = 'si',
): SheetRecord {
  const units = isSourceUnits(record.sourceUnits)
    ? SOURCE_UNIT_LABELS[record.sourceUnits]
    : record.sourceUnits
  const pga =
    system === 'us'
      ? `${num(g(record.pgaMPerS2))} g`
      : `${num(g(record.pgaMPerS2))} g (${num(record.pgaMPerS2)} m/s²)`
  const pgv = inUnits(record.pgvMPerS, FILE_UNITS[system].velocity)
  const pgd = inUnits(record.pgdM, FILE_UNITS[system].displacement)
  const origin = record.synthetic
    ? [{ label: 'Origin', value: 'Synthetic record (demonstration data, not recorded motion)' }]
    : []
  const head = [
    ...(record.component ? [{ label: 'Component', value: record.component }] : []),
    { label: 'Source file', value: record.sourceFileName },
    // A processed record's hash is of its stored samples; the original file's is in the processing statement.
    record.processing
      ? { label: 'SHA-256 of the processed samples', value: record.sha256 }
      : { label: 'SHA-256 of the file', value: record.sha256 },
  ]
  if (compact) {
    return {
      name: record.name,
      fields: [
        ...head,
        {
          label: 'Points, Δt, duration',
          value: `${record.points} points at Δt = ${num(record.dtS)} s, ${num(record.durationS)} s`,
        },
        {
          label: 'Units and processing',
          value: `${record.format}, ${units}. ${processingStatement(units, record.processing)}`,
        },
        { label: 'PGA, PGV, PGD', value: `${pga}; ${pgv}; ${pgd}` },
        ...origin,
      ],
    }
  }
  return {
    name: record.name,
    fields: [
      ...head,
      { label: 'Format, source units', value: `${record.format}, ${units}` },
      { label: 'Points', value: String(record.points) },
      { label: 'Time step Δt', value: `${num(record.dtS)} s` },
      { label: 'Duration', value: `${num(record.durationS)} s` },
      { label: 'PGA', value: pga },
      { label: 'PGV', value: pgv },
      { label: 'PGD', value: pgd },
      { label: 'Arias intensity Ia', value: `${num(record.ariasMPerS)} m/s` },
      { label: 'Significant duration D5-95', value: `${num(record.d595S)} s` },
      { label: CAV_LABEL, value: `${num(record.cavMPerS)} m/s` },
      { label: 'Processing', value: processingStatement(units, record.processing) },
      ...origin,
    ],
  }
}

function curveLabel(curve: RunSpectrumLike['curves'][number]): string {
  const combination = curve.combination ? `, ${COMBINATION_LABELS[curve.combination]}` : ''
  return `${dampingLabel(curve.dampingRatio)}${combination}`
}

/**
 * PSA in g at T = 0 (the PGA) and the standard periods, per curve, then the peak and its
 * period. Standard periods off the run's grid are read log-log and marked.
 */
export function runOrdinateTable(spectrum: RunSpectrumLike, pgaMPerS2: number | null): SheetTable {
  const periods = Array.from(spectrum.periodsS)
  const curves = spectrum.curves
  let interpolated = false
  let outside = false
  const rows: SheetTable['rows'] = [
    { label: '0 (PGA)', cells: curves.map(() => (pgaMPerS2 === null ? '—' : sig(g(pgaMPerS2)))) },
  ]
  for (const periodS of STANDARD_PERIODS_S) {
    const readings = curves.map((c) => ordinateAtPeriod(periods, c.psaMPerS2, periodS))
    const offGrid = readings.some((r) => r.kind === 'interpolated')
    interpolated ||= offGrid
    outside ||= readings.some((r) => r.kind === 'outside')
    rows.push({
      label: `${periodS}${offGrid ? ' *' : ''}`,
      cells: readings.map((r) => (r.kind === 'outside' ? '—' : sig(g(r.value)))),
    })
  }
  const peaks = curves.map((c) => peakOrdinate(periods, c.psaMPerS2))
  rows.push({ label: 'Peak PSA', cells: peaks.map((p) => (p ? sig(g(p.value)) : '—')), emphasis: true })
  rows.push({
    label: 'Period of peak (s)',
    cells: peaks.map((p) => (p ? sig(p.periodS, 3) : '—')),
    emphasis: true,
  })
  const notes = [
    `PSA in g (g = ${STANDARD_GRAVITY_M_PER_S2} m/s²). T = 0 is the record’s PGA; the peak is the largest PSA over the run’s period grid.`,
  ]
  if (interpolated) {
    notes.push(
      '* Not on the run’s period grid: interpolated log-log (straight in ln T and ln PSA) between the neighbouring grid periods.',
    )
  }
  if (outside) notes.push('— Outside the run’s period range: not extrapolated.')
  if (pgaMPerS2 === null)
    notes.push(
      'The PGA of a combination of two components is not tabulated; each component’s PGA is listed with its record.',
    )
  return {
    title: 'Pseudo-spectral acceleration PSA (g) at standard periods',
    columns: ['Period T (s)', ...curves.map(curveLabel)],
    rows,
    notes,
  }
}

/** Each distinct value of a statement field, joined: the same words twice read once. */
function distinct(methods: MethodFacts[], pick: (m: MethodFacts) => string): string {
  const values = [...new Set(methods.map(pick))]
  return values.length > 0 ? values.join(' / ') : 'not recorded'
}

function methodFields(facts: RunSheetFacts): SheetField[] {
  const { settings } = facts.run
  const methods = facts.methods
  const subStepRange = (m: MethodFacts) =>
    m.subStepsMin === m.subStepsMax ? `${m.subStepsMin}` : `${m.subStepsMin} to ${m.subStepsMax}`
  return [
    { label: 'Oscillator', value: 'Linear SDOF, unit mass: u″ + 2ζωu′ + ω²u = −a_g(t), ω = 2π/T' },
    { label: 'Solver', value: distinct(methods, (m) => m.solver) },
    { label: 'Record time step Δt', value: distinct(methods, (m) => `${num(m.recordDtS)} s`) },
    {
      label: 'Sub-steps',
      value: `${distinct(methods, subStepRange)} per record step. ${distinct(methods, (m) => m.subStepRule)}`,
    },
    { label: 'Initial conditions', value: distinct(methods, (m) => m.initialConditions) },
    { label: 'Free vibration after the record', value: distinct(methods, (m) => m.freeVibrationTail) },
    { label: 'Damping ratios', value: settings.dampingRatios.map(dampingLabel).join(', ') },
    { label: 'Period grid', value: periodGridStatement(settings) },
    ...facts.records.flatMap((r) =>
      r.processing
        ? [
            {
              label: facts.records.length > 1 ? `Record processing, ${r.name}` : 'Record processing',
              value: describeProcessing(r.processing, r.sourceUnits),
            },
          ]
        : [],
    ),
    { label: 'Ordinates', value: 'SD = max|u|, SV = max|u′|, SA = max|ü + a_g|, PSV = ωSD, PSA = ω²SD' },
    { label: 'Units', value: unitsStatement(facts.units ?? 'si') },
    { label: 'Accuracy', value: distinct(methods, (m) => m.accuracyTarget) },
    {
      label: 'Engine version',
      value: `${facts.run.engineVersion ?? distinct(methods, (m) => m.engineVersion)} (kernel ${distinct(methods, (m) => m.kernel)})`,
    },
  ]
}

export function buildRunSheetFromFacts(facts: RunSheetFacts): Sheet {
  const { run } = facts
  const single = facts.records.length === 1 ? facts.records[0] : undefined
  return {
    ...sheetHead(facts, {
      kind: 'run',
      id: run.id,
      title: `Elastic response spectrum: ${facts.subjectName}`,
      revision: run.revision,
      preparedByName: run.createdByName,
      doneAt: run.finishedAt ?? run.createdAt,
      doneVerb: 'computed',
    }),
    records: facts.records.map((r) => recordSection(r, false, facts.units)),
    method: methodFields(facts),
    chart: withUsableBand(
      runSpectrumChartInput(facts.spectrum, facts.subjectName, facts.view ?? DEFAULT_SPECTRUM_VIEW),
      usablePeriodLimit(facts.records),
    ),
    tables: [runOrdinateTable(facts.spectrum, single ? single.pgaMPerS2 : null)],
    comparison: null,
    warnings: [
      ...facts.spectrumWarnings,
      ...[usableBandCautionFor(facts.records, facts.spectrum.periodsS)].filter((c) => c !== null),
    ],
    cautions: [...SHEET_CAUTIONS],
  }
}

import { parseStored } from '../db/parseStored.js'
import { CAUTION } from '../../shared/cautions.js'
import { and, eq } from 'drizzle-orm'
import { spectrumResultSchema } from '../../shared/schemas/spectrum.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import type { Db } from '../db/client.js'
import { records } from '../db/schema.js'
import { ordinateVersion } from '../exports/sheetParts.js'
import { getRunSpectrum } from './runs.js'

export const CSV_CAUTION = CAUTION

/** The ordinate columns, with their units in the names. */
export const CSV_ORDINATE_COLUMNS = [
  'sd_m',
  'sv_m_per_s',
  'sa_m_per_s2',
  'psv_m_per_s',
  'psa_m_per_s2',
  'psa_g',
] as const

const COMBINATION_TEXT =
  'Combination of the two components: geomean = geometric mean of their spectra; rotd50 and rotd100 = median and maximum over rotation angles 0–179° (Boore 2010).'

/** A header line: "# " then the text on one line (a stray newline would break the file). */
const comment = (text: string) => `# ${text.replace(/[\r\n]+/g, ' ')}`

/** Shortest text that reads back as the same double (ECMAScript Number::toString). */
const num = (value: number) => String(value)

const percent = (ratio: number) => `${Number((ratio * 100).toPrecision(6))}%`

/**
 * A succeeded run's spectrum as CSV: `#` comment lines saying what produced it (product and
 * engine versions, the record and its SHA-256, the method, the cautions), then one row per
 * period and damping ratio (periods in the run's order), every ordinate in SI plus PSA in g.
 * A pair run adds a `combination` column, one block of rows per damping ratio and combination.
 */
export function runSpectrumCsv(db: Db, firmId: string, runId: string): { fileName: string; text: string } {
  const { run, result } = getRunSpectrum(db, firmId, runId)
  const spectrum = parseStored(spectrumResultSchema, result, 'spectrum')
  const record = run.recordId
    ? db
        .select({
          name: records.name,
          sourceFileName: records.sourceFileName,
          points: records.points,
          synthetic: records.synthetic,
        })
        .from(records)
        .where(and(eq(records.firmId, firmId), eq(records.id, run.recordId)))
        .get()
    : undefined
  const m = spectrum.methodStatement
  const combined = spectrum.curves.some((c) => c.combination !== undefined)
  const subSteps = m.subStepsMin === m.subStepsMax ? `${m.subStepsMin}` : `${m.subStepsMin}–${m.subStepsMax}`
  const lines = [
    comment(`Ordinate ${ordinateVersion()}: elastic response spectrum of run ${run.id}`),
    comment(
      `Record: ${run.subjectName}${record ? ` (file ${record.sourceFileName}, ${record.points} points${record.synthetic ? ', synthetic' : ''})` : ''}; SHA-256 ${run.recordSha256}`,
    ),
    comment(
      `Computed: ${run.finishedAt ? new Date(run.finishedAt).toISOString() : 'unknown'} by ${m.engineVersion}`,
    ),
    comment(
      `Processing: read from ${spectrum.record.sourceUnits} and converted to m/s²; no baseline correction or filtering applied by Ordinate`,
    ),
    comment(`Solver: ${m.solver}`),
    comment(`Time step of the record: Δt = ${num(m.recordDtS)} s; sub-steps per oscillator: ${subSteps}`),
    comment(`Sub-step rule: ${m.subStepRule}`),
    comment(`Initial conditions: ${m.initialConditions} Free-vibration tail: ${m.freeVibrationTail}`),
    comment(`Accuracy: ${m.accuracyTarget}`),
    comment(
      `Damping ratios: ${run.settings.dampingRatios.map((d) => `${num(d)} (${percent(d)})`).join(', ')}`,
    ),
    comment(
      `Periods: ${spectrum.periodsS.length} (${run.settings.periodChoice === 'default' ? 'default grid, 100 per decade from 0.01 to 10 s' : run.settings.periodChoice === 'grid' ? 'log-spaced grid' : 'as listed'})`,
    ),
    comment(
      `Units: SI (m, m/s, m/s²); psa_g uses g = ${STANDARD_GRAVITY_M_PER_S2} m/s². SV is relative, SA absolute; PSV = ωSD, PSA = ω²SD.`,
    ),
    ...spectrum.warnings.map((w) => comment(`Warning: ${w}`)),
    ...(combined ? [comment(COMBINATION_TEXT)] : []),
    comment(`Caution: ${CSV_CAUTION}`),
    ['period_s', 'damping_ratio', ...(combined ? ['combination'] : []), ...CSV_ORDINATE_COLUMNS].join(','),
  ]
  for (const curve of spectrum.curves) {
    spectrum.periodsS.forEach((periodS, i) => {
      lines.push(
        [
          num(periodS),
          num(curve.dampingRatio),
          ...(combined ? [curve.combination ?? ''] : []),
          num(curve.sdM[i]!),
          num(curve.svMPerS[i]!),
          num(curve.saMPerS2[i]!),
          num(curve.psvMPerS[i]!),
          num(curve.psaMPerS2[i]!),
          num(curve.psaMPerS2[i]! / STANDARD_GRAVITY_M_PER_S2),
        ].join(','),
      )
    })
  }
  const safeName = run.subjectName.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '') || 'record'
  return { fileName: `${safeName}-spectrum-${run.id.slice(0, 8)}.csv`, text: lines.join('\r\n') + '\r\n' }
}

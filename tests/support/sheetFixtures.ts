import { createHash } from 'node:crypto'
import { computeSpectrum } from '../../shared/spectra/computeSpectrum.js'
import { DEMO_RECORD_IDS, demoRecord } from '../../shared/spectra/demo/demoRecords.js'
import { parseRecord } from '../../shared/spectra/parseRecord.js'
import { defaultPeriodsS } from '../../shared/spectra/periods.js'
import { recordParameters, recordWarnings } from '../../shared/spectra/recordParameters.js'
import { warningMessages } from '../../shared/warningMessages.js'
import { type RunSheetFacts, buildRunSheetFromFacts } from '../../server/exports/runSheet.js'
import type { ReviewFacts } from '../../server/exports/sheetParts.js'

/**
 * Facts for a run sheet from a real engine computation on the first synthetic demo record
 * (8,001 points at Δt = 0.005 s), damping 2% and 5%, on the default period grid.
 */
export function demoRunFacts(): RunSheetFacts {
  const demo = demoRecord(DEMO_RECORD_IDS[0] as (typeof DEMO_RECORD_IDS)[number])
  const parsed = parseRecord(demo.text)
  const params = recordParameters(parsed.accelMPerS2, parsed.dtS)
  const periodsS = defaultPeriodsS()
  const dampingRatios = [0.02, 0.05]
  const computation = computeSpectrum(
    { accelMPerS2: parsed.accelMPerS2, dtS: parsed.dtS },
    { dampingRatios, periodsS, method: 'newmark-average' },
  )
  return {
    productVersion: '0.1.0',
    firmName: 'Halvorsen Kade Structural',
    projectName: 'Tidewater Library Annex',
    run: {
      id: '3f2a9c1b-0000-4000-8000-000000000001',
      revision: 1,
      settings: {
        method: 'newmark-average',
        dampingRatios,
        periodsS,
        periodChoice: 'default',
        periodGrid: null,
      },
      engineVersion: computation.methodStatement.engineVersion,
      createdByName: 'Ines Marlowe',
      createdAt: Date.UTC(2026, 0, 12, 9, 0),
      finishedAt: Date.UTC(2026, 0, 12, 9, 1),
    },
    records: [
      {
        name: demo.name,
        component: null,
        sourceFileName: demo.fileName,
        sha256: createHash('sha256').update(demo.text).digest('hex'),
        format: parsed.format,
        sourceUnits: parsed.sourceUnits,
        points: params.points,
        dtS: params.dtS,
        durationS: params.durationS,
        pgaMPerS2: params.pgaMPerS2,
        pgvMPerS: params.pgvMPerS,
        pgdM: params.pgdM,
        ariasMPerS: params.ariasMPerS,
        d595S: params.d595S,
        cavMPerS: params.cavMPerS,
        synthetic: true,
      },
    ],
    subjectName: demo.name,
    spectrum: { periodsS: Array.from(computation.periodsS), curves: computation.curves },
    methods: [computation.methodStatement],
    spectrumWarnings: [
      ...parsed.warnings,
      ...recordWarnings(parsed.accelMPerS2, parsed.dtS),
      ...warningMessages(computation.warnings),
    ],
    review: null,
  }
}

let cached: RunSheetFacts | undefined

/**
 * The demo run's sheet, its facts computed once per test file (the sweep takes a moment);
 * `name` renames the record, `review` sets the review.
 */
export function demoRunSheet(options: { name?: string; review?: ReviewFacts | null } = {}) {
  cached ??= demoRunFacts()
  const name = options.name
  return buildRunSheetFromFacts({
    ...cached,
    ...(name ? { subjectName: name, records: cached.records.map((r) => ({ ...r, name })) } : {}),
    review: options.review ?? null,
  })
}

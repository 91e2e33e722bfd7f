import { createHash } from 'node:crypto'
import { DEFAULT_PLOT_POINTS, type RecordDetail, type RecordSamples } from '../../shared/schemas/records.js'
import type {
  FourierSpectrumBody,
  ProcessedParameters,
  ProcessingPreview,
  ProcessingSettingsBody,
  RecordProcessing,
} from '../../shared/schemas/processing.js'
import { filterGain } from '../../shared/spectra/processing/filterGain.js'
import { fourierSpectrum } from '../../shared/spectra/processing/fourierSpectrum.js'
import {
  processingIssues,
  processRecord,
  type ProcessedRecord,
} from '../../shared/spectra/processing/processRecord.js'
import { integrateRecord, recordParameters, recordWarnings } from '../../shared/spectra/recordParameters.js'
import { recordProcessingSchema } from '../../shared/schemas/processing.js'
import type { Db } from '../db/client.js'
import { parseStored } from '../db/parseStored.js'
import { records } from '../db/schema.js'
import { badRequest } from '../httpError.js'
import { newId } from '../ids.js'
import { recordAudit } from './audit.js'
import { decimateMinMax } from './decimateMinMax.js'
import { resolveOpenProject } from './projects.js'
import { getRecord, loadRecordSamples, parameterColumns, type RecordUploader } from './records.js'
import { encodeSamples } from './sampleBlob.js'

/**
 * Applies the settings to the firm's record, refusing with 400 (naming each field) before any
 * work when they do not fit the record: a corner at or above Nyquist, a high-pass at or above
 * the low-pass, a taper over a quarter of the record, pads on a causal filter, or a result over
 * 2,000,000 points.
 */
function processFirmRecord(
  db: Db,
  firmId: string,
  recordId: string,
  settings: ProcessingSettingsBody,
): { record: RecordDetail; original: Float64Array; processed: ProcessedRecord } {
  const found = getRecord(db, firmId, recordId)
  const issues = processingIssues(settings, found.points, found.dtS)
  if (issues.length > 0) {
    const first = issues[0]!
    throw badRequest(`${first.path.join('.')}: ${first.message}`, 'invalid_processing', { issues })
  }
  const { record, accelMPerS2 } = loadRecordSamples(db, firmId, recordId)
  return { record, original: accelMPerS2, processed: processRecord(accelMPerS2, record.dtS, settings) }
}

function parametersOf(accelMPerS2: Float64Array, dtS: number): ProcessedParameters {
  const { velMPerS, dispM } = integrateRecord(accelMPerS2, dtS)
  return {
    ...recordParameters(accelMPerS2, dtS),
    finalVelMPerS: velMPerS[velMPerS.length - 1]!,
    finalDispM: dispM[dispM.length - 1]!,
  }
}

/** Histories for plotting, thinned as GET /api/records/:id/samples does, starting at startS. */
function histories(accelMPerS2: Float64Array, dtS: number, startS: number, maxPoints: number): RecordSamples {
  const { velMPerS, dispM } = integrateRecord(accelMPerS2, dtS)
  const { timeS, series } = decimateMinMax([accelMPerS2, velMPerS, dispM], dtS, maxPoints)
  const [accel, vel, disp] = series as [Float64Array, Float64Array, Float64Array]
  return {
    timeS: Array.from(timeS, (t) => t + startS),
    accelMPerS2: Array.from(accel),
    velMPerS: Array.from(vel),
    dispM: Array.from(disp),
  }
}

function fourierBody(accelMPerS2: Float64Array, dtS: number): FourierSpectrumBody {
  const f = fourierSpectrum(accelMPerS2, dtS)
  return {
    frequencyHz: Array.from(f.frequencyHz),
    rawMPerS: Array.from(f.rawMPerS),
    smoothedMPerS: Array.from(f.smoothedMPerS),
  }
}

/** The longest usable period of a record processed from `parent` with a step of limit `own`. */
function chainUsablePeriodMaxS(parent: RecordDetail, own: number | null): number | null {
  const inherited = parent.processing?.usablePeriodMaxS ?? null
  if (inherited === null) return own
  if (own === null) return inherited
  return Math.min(inherited, own)
}

/** POST /api/records/:id/processing/preview: before and after, nothing stored. */
export function previewProcessing(
  db: Db,
  firmId: string,
  recordId: string,
  settings: ProcessingSettingsBody,
  maxPoints = DEFAULT_PLOT_POINTS,
): ProcessingPreview {
  const { record, original, processed } = processFirmRecord(db, firmId, recordId, settings)
  const dtS = record.dtS
  const after = fourierBody(processed.accelMPerS2, dtS)
  const gain = filterGain(settings, dtS, Float64Array.from(after.frequencyHz))
  return {
    before: {
      histories: histories(
        original,
        dtS,
        record.processing?.pads === 'keep' ? -record.processing.padS : 0,
        maxPoints,
      ),
      fourier: fourierBody(original, dtS),
      parameters: parametersOf(original, dtS),
      warnings: record.warnings,
    },
    after: {
      histories: histories(processed.accelMPerS2, dtS, processed.startTimeS, maxPoints),
      fourier: after,
      parameters: parametersOf(processed.accelMPerS2, dtS),
      warnings: [...processed.warnings, ...recordWarnings(processed.accelMPerS2, dtS)],
    },
    gain: { frequencyHz: after.frequencyHz, gain: Array.from(gain) },
    applied: processed.applied,
    usablePeriodMaxS: chainUsablePeriodMaxS(record, processed.usablePeriodMaxS),
  }
}

/**
 * POST /api/records/:id/processed: stores the processed record as a child of the parent, in SI
 * with its kept pads, its parameters computed afresh, and its sha256 that of its stored
 * little-endian Float64 samples. The parent is never changed. Every check happens before the
 * one insert.
 */
export function createProcessedRecord(
  db: Db,
  member: RecordUploader,
  recordId: string,
  body: ProcessingSettingsBody & { name?: string },
): RecordDetail {
  const { name, ...settings } = body
  const { record: parent, processed } = processFirmRecord(db, member.firmId, recordId, settings)
  const dtS = parent.dtS
  const parameters = recordParameters(processed.accelMPerS2, dtS)
  const samples = encodeSamples(processed.accelMPerS2)
  const sha256 = createHash('sha256').update(samples).digest('hex')
  const step = { ...processed.applied, sourceSha256: parent.sha256 }
  const processing: RecordProcessing = {
    ...step,
    parentSha256: parent.sha256,
    usablePeriodMaxS: chainUsablePeriodMaxS(parent, processed.usablePeriodMaxS),
    chain: [...(parent.processing?.chain ?? []), step],
  }
  const id = newId()
  db.transaction(
    (tx) => {
      resolveOpenProject(tx, member.firmId, parent.projectId, 'records')
      tx.insert(records)
        .values({
          id,
          firmId: member.firmId,
          projectId: parent.projectId,
          name: name?.trim() || `${parent.name} (processed)`.slice(0, 200),
          component: parent.component,
          sourceFileName: parent.sourceFileName,
          sha256,
          format: parent.format,
          sourceUnits: parent.sourceUnits,
          ...parameterColumns(parameters),
          dtS,
          warnings: [...processed.warnings, ...recordWarnings(processed.accelMPerS2, dtS)],
          samples,
          synthetic: parent.synthetic,
          parentId: parent.id,
          processing,
          uploadedBy: member.userId,
          createdAt: Date.now(),
        })
        .run()
      recordAudit(tx, {
        firmId: member.firmId,
        userId: member.userId,
        action: 'record.processed',
        subjectType: 'record',
        subjectId: id,
        detail: { parentId: parent.id, parentSha256: parent.sha256, sha256, points: parameters.points },
      })
    },
    { behavior: 'immediate' },
  )
  return getRecord(db, member.firmId, id)
}

/** GET /api/records/:id/fourier: the record's Fourier amplitude spectrum as stored (pads included). */
export function recordFourier(db: Db, firmId: string, recordId: string): FourierSpectrumBody {
  const { record, accelMPerS2 } = loadRecordSamples(db, firmId, recordId)
  return fourierBody(accelMPerS2, record.dtS)
}

/** records.processing as stored: null for a record as received. */
export function decodeRecordProcessing(value: unknown): RecordProcessing | null {
  return value == null ? null : parseStored(recordProcessingSchema, value, 'record processing')
}

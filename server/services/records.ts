import { createHash } from 'node:crypto'
import path from 'node:path'
import { and, asc, count, desc, eq, inArray, isNotNull, or, type SQL } from 'drizzle-orm'
import { may, refusalFor } from '../../shared/permissions.js'
import { parseRecord, RecordParseError } from '../../shared/spectra/parseRecord.js'
import {
  type RecordParameters,
  integrateRecord,
  recordParameters,
  recordWarnings,
} from '../../shared/spectra/recordParameters.js'
import type { SourceUnits } from '../../shared/spectra/units.js'
import { recordProcessingSchema } from '../../shared/schemas/processing.js'
import type {
  RecordDetail,
  RecordInfo,
  RecordSamples,
  UpdateRecordBody,
} from '../../shared/schemas/records.js'
import type { Db, Tx } from '../db/client.js'
import { parseStored } from '../db/parseStored.js'
import { projects, recordPairs, records, runs, users } from '../db/schema.js'
import { badRequest, conflict, forbidden, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordSummaryColumns } from '../runs/recordSummaryColumns.js'
import { auditAction } from './audit.js'
import { decimateMinMax } from './decimateMinMax.js'
import { removeOriginal, storeOriginal } from './originals.js'
import { resolveOpenProject, resolveProject } from './projects.js'
import { decodeSamples, encodeSamples } from './sampleBlob.js'

/** Who adds a record: the signed-in member, or the demo seeder acting as a demo member. */
export type RecordUploader = Pick<Member, 'userId' | 'firmId'>

export interface CreateRecordInput {
  /** The file exactly as uploaded; kept unaltered under its SHA-256. */
  bytes: Uint8Array
  /** The uploaded file's name, kept for display only (never used as a storage path). */
  fileName: string
  name?: string
  /** The file's units, when the file does not state them. */
  units?: SourceUnits
  /** The time step in seconds, when the file does not state it. */
  dtS?: number
  component?: string
  /** Without it, the firm's default project. */
  projectId?: string
  /** True for records Ordinate generated (demo data); shown with a "synthetic" label. */
  synthetic?: boolean
}

/**
 * Reads the upload as text. UTF-16 files (with their byte-order mark) are decoded as such;
 * anything else as UTF-8, where undecodable bytes become U+FFFD and the parser then names the
 * line they are on.
 */
function decodeText(bytes: Uint8Array): string {
  const encoding =
    bytes[0] === 0xff && bytes[1] === 0xfe
      ? 'utf-16le'
      : bytes[0] === 0xfe && bytes[1] === 0xff
        ? 'utf-16be'
        : 'utf-8'
  return new TextDecoder(encoding).decode(bytes)
}

/** The form field a parse refusal concerns, so the upload form can show it there. */
function fieldOfParseError(err: RecordParseError, input: CreateRecordInput): 'file' | 'units' | 'dtS' {
  if (err.code === 'units_missing' || (err.code === 'units_conflict' && input.units !== undefined))
    return 'units'
  if (err.code === 'dt_missing' || (err.code === 'dt_conflict' && input.dtS !== undefined)) return 'dtS'
  return 'file'
}

function displayFileName(fileName: string): string {
  const base = path.basename(fileName.replace(/\\/g, '/')).trim()
  return (base || 'record').slice(0, 255)
}

function defaultName(fileName: string): string {
  const ext = path.extname(fileName)
  return (ext ? fileName.slice(0, -ext.length) : fileName).slice(0, 200) || 'Record'
}

/**
 * Validates, parses and stores a record. Every refusal (400 with the line from the parser,
 * 404 for another firm's project) happens before anything is written. The original bytes
 * are stored under `<dataDir>/originals/<sha256>` and the row inserted in one transaction;
 * when the insert fails, a file this call created is removed again unless another record
 * already references the same hash.
 */
export function createRecord(
  db: Db,
  dataDir: string,
  member: RecordUploader,
  input: CreateRecordInput,
): RecordInfo {
  const project = resolveOpenProject(db, member.firmId, input.projectId, 'records')
  let parsed
  try {
    parsed = parseRecord(decodeText(input.bytes), { units: input.units, dtS: input.dtS })
  } catch (err) {
    if (err instanceof RecordParseError) {
      const field = fieldOfParseError(err, input)
      throw badRequest(err.message, `record_${err.code}`, {
        line: err.line,
        issues: [{ path: [field], message: err.message }],
      })
    }
    throw err
  }
  const parameters = recordParameters(parsed.accelMPerS2, parsed.dtS)
  const warnings = [...parsed.warnings, ...recordWarnings(parsed.accelMPerS2, parsed.dtS)]
  const sha256 = createHash('sha256').update(input.bytes).digest('hex')
  const fileName = displayFileName(input.fileName)

  const info: RecordInfo = {
    id: newId(),
    name: input.name?.trim() || defaultName(fileName),
    projectId: project.id,
    ...parameterColumns(parameters),
    sourceUnits: parsed.sourceUnits,
    component: input.component?.trim() || null,
    sha256,
    uploadedBy: member.userId,
    createdAt: Date.now(),
    warnings,
  }

  const { created } = storeOriginal(dataDir, sha256, input.bytes)
  try {
    db.transaction(
      (tx) => {
        tx.insert(records)
          .values({
            ...info,
            firmId: member.firmId,
            sourceFileName: fileName,
            format: parsed.format,
            samples: encodeSamples(parsed.accelMPerS2),
            synthetic: input.synthetic ?? false,
          })
          .run()
        auditAction(
          tx,
          member,
          'record.uploaded',
          { type: 'record', id: info.id },
          {
            name: info.name,
            sha256,
            fileName,
            points: info.points,
            synthetic: input.synthetic ?? false,
          },
        )
      },
      { behavior: 'immediate' },
    )
  } catch (err) {
    if (created && !hashInUse(db, sha256)) removeOriginal(dataDir, sha256)
    throw err
  }
  return info
}

function hashInUse(db: Db, sha256: string): boolean {
  return (
    db.select({ id: records.id }).from(records).where(eq(records.sha256, sha256)).limit(1).get() !== undefined
  )
}

const detailColumns = {
  id: records.id,
  name: records.name,
  projectId: records.projectId,
  ...recordSummaryColumns,
  component: records.component,
  sha256: records.sha256,
  uploadedBy: records.uploadedBy,
  createdAt: records.createdAt,
  projectName: projects.name,
  uploaderName: users.name,
  sourceFileName: records.sourceFileName,
  format: records.format,
  synthetic: records.synthetic,
  parentId: records.parentId,
  processing: records.processing,
}

function selectDetails(db: Db) {
  return db
    .select(detailColumns)
    .from(records)
    .innerJoin(projects, eq(projects.id, records.projectId))
    .innerJoin(users, eq(users.id, records.uploadedBy))
}

type DetailRow = Omit<RecordDetail, 'sourceUnits' | 'processing' | 'children'> & {
  sourceUnits: string
  processing: unknown
}

const asDetail = (row: DetailRow, children: RecordDetail['children']): RecordDetail => ({
  ...row,
  sourceUnits: row.sourceUnits as SourceUnits,
  processing:
    row.processing == null ? null : parseStored(recordProcessingSchema, row.processing, 'record processing'),
  children,
})

/** The firm's processed records by parent id, oldest first. */
function childrenByParent(db: Db, firmId: string, parentId?: string): Map<string, RecordDetail['children']> {
  const rows = db
    .select({ id: records.id, name: records.name, createdAt: records.createdAt, parentId: records.parentId })
    .from(records)
    .where(
      and(
        eq(records.firmId, firmId),
        parentId ? eq(records.parentId, parentId) : isNotNull(records.parentId),
      ),
    )
    .orderBy(asc(records.createdAt))
    .all()
  const map = new Map<string, RecordDetail['children']>()
  for (const { parentId: p, ...child } of rows) {
    if (!p) continue
    const list = map.get(p) ?? []
    list.push(child)
    map.set(p, list)
  }
  return map
}

/** The firm's records, newest first, optionally in one project (another firm's project answers 404). */
export function listRecords(db: Db, firmId: string, projectId?: string): RecordDetail[] {
  if (projectId) resolveProject(db, firmId, projectId)
  const where = projectId
    ? and(eq(records.firmId, firmId), eq(records.projectId, projectId))
    : eq(records.firmId, firmId)
  const children = childrenByParent(db, firmId)
  return selectDetails(db)
    .where(where)
    .orderBy(desc(records.createdAt))
    .all()
    .map((row) => asDetail(row, children.get(row.id) ?? []))
}

/** One of the firm's records; another firm's id answers 404, never 403. */
export function getRecord(db: Db, firmId: string, recordId: string): RecordDetail {
  const row = selectDetails(db)
    .where(and(eq(records.firmId, firmId), eq(records.id, recordId)))
    .get()
  if (!row) throw notFound('The record')
  return asDetail(row, childrenByParent(db, firmId, recordId).get(recordId) ?? [])
}

/** For the run service: the record and its samples in m/s², scoped to the firm (404 otherwise). */
export function loadRecordSamples(
  db: Db,
  firmId: string,
  recordId: string,
): { record: RecordDetail; accelMPerS2: Float64Array } {
  const record = getRecord(db, firmId, recordId)
  const row = db.select({ samples: records.samples }).from(records).where(eq(records.id, recordId)).get()
  if (!row) throw notFound('The record')
  return { record, accelMPerS2: decodeSamples(row.samples) }
}

/**
 * The record in SI for plotting: acceleration, and velocity and displacement by the engine's
 * trapezoidal integration of the full record, then thinned to at most maxPoints by min/max
 * buckets so every peak survives.
 */
export function recordSamplesForPlot(
  db: Db,
  firmId: string,
  recordId: string,
  maxPoints: number,
): RecordSamples {
  const { record, accelMPerS2 } = loadRecordSamples(db, firmId, recordId)
  const { velMPerS, dispM } = integrateRecord(accelMPerS2, record.dtS)
  const { timeS, series } = decimateMinMax([accelMPerS2, velMPerS, dispM], record.dtS, maxPoints)
  const [accel, vel, disp] = series as [Float64Array, Float64Array, Float64Array]
  // A processed record's kept pads come before the original's first sample.
  const startS = record.processing?.pads === 'keep' ? -record.processing.padS : 0
  return {
    timeS: Array.from(timeS, (t) => t + startS),
    accelMPerS2: Array.from(accel),
    velMPerS: Array.from(vel),
    dispM: Array.from(disp),
  }
}

/** The record parameters a record row keeps, from the engine's full set. */
export function parameterColumns(p: RecordParameters) {
  const { points, dtS, durationS, pgaMPerS2, pgvMPerS, pgdM, ariasMPerS, d595S, cavMPerS } = p
  return { points, dtS, durationS, pgaMPerS2, pgvMPerS, pgdM, ariasMPerS, d595S, cavMPerS }
}

/** The firm's record pairs that have the record as one of their components. */
export function pairIdsOfRecord(db: Tx, firmId: string, recordId: string): string[] {
  return db
    .select({ id: recordPairs.id })
    .from(recordPairs)
    .where(
      and(
        eq(recordPairs.firmId, firmId),
        or(eq(recordPairs.record1Id, recordId), eq(recordPairs.record2Id, recordId)),
      ),
    )
    .all()
    .map((p) => p.id)
}

/**
 * The runs that read a record: its own runs and those of every pair it is a component of, so
 * the record's page lists the runs its deletion is refused for.
 */
export function runsOfRecordCondition(
  db: Tx,
  firmId: string,
  recordId: string,
  pairIds = pairIdsOfRecord(db, firmId, recordId),
): SQL {
  return pairIds.length
    ? (or(eq(runs.recordId, recordId), inArray(runs.pairId, pairIds)) as SQL)
    : eq(runs.recordId, recordId)
}

/**
 * Deletes a record: only its uploader or an admin. While a run uses the record, directly or
 * through a pair, it answers 409. Pairs the record belongs to are removed with it. The
 * original file goes too, unless another record still references the same bytes.
 */
export function removeRecord(db: Db, dataDir: string, member: Member, recordId: string): void {
  const record = getRecord(db, member.firmId, recordId)
  if (record.uploadedBy !== member.userId && !may(member.roles, 'records.removeAny')) {
    throw forbidden(
      `Only the member who uploaded this record may delete it. ${refusalFor('records.removeAny')}`,
    )
  }
  db.transaction(
    (tx) => {
      const pairIds = pairIdsOfRecord(tx, member.firmId, recordId)
      const usedBy = tx
        .select({ n: count() })
        .from(runs)
        .where(runsOfRecordCondition(tx, member.firmId, recordId, pairIds))
        .get()
      const children = tx
        .select({ n: count() })
        .from(records)
        .where(and(eq(records.firmId, member.firmId), eq(records.parentId, recordId)))
        .get()
      if ((children?.n ?? 0) > 0) {
        throw conflict(
          `This record has ${children!.n === 1 ? 'a processed record' : `${children!.n} processed records`} made from it; delete ${children!.n === 1 ? 'that' : 'those'} first.`,
          'record_has_children',
        )
      }
      if ((usedBy?.n ?? 0) > 0) {
        throw conflict(
          `This record is used by ${usedBy!.n === 1 ? 'a run' : `${usedBy!.n} runs`}; records that runs depend on cannot be deleted.`,
          'record_in_use',
        )
      }
      for (const pairId of pairIds) {
        tx.delete(recordPairs).where(eq(recordPairs.id, pairId)).run()
        auditAction(
          tx,
          member,
          'record_pair.deleted',
          { type: 'record_pair', id: pairId },
          { reason: 'record deleted', recordId },
        )
      }
      tx.delete(records).where(eq(records.id, recordId)).run()
      const deleted = { name: record.name, sha256: record.sha256 }
      auditAction(tx, member, 'record.deleted', { type: 'record', id: recordId }, deleted)
    },
    { behavior: 'immediate' },
  )
  if (!hashInUse(db, record.sha256)) removeOriginal(dataDir, record.sha256)
}

/** PATCH /api/records/:id: renames one of the firm's records; its samples, file and hash never change. */
export function renameRecord(
  db: Db,
  member: Member,
  recordId: string,
  input: UpdateRecordBody,
): RecordDetail {
  db.transaction(
    (tx) => {
      const current = tx
        .select({ name: records.name })
        .from(records)
        .where(and(eq(records.firmId, member.firmId), eq(records.id, recordId)))
        .get()
      if (!current) throw notFound('The record')
      if (current.name === input.name) return
      tx.update(records).set({ name: input.name }).where(eq(records.id, recordId)).run()
      const renamed = { from: current.name, to: input.name }
      auditAction(tx, member, 'record.renamed', { type: 'record', id: recordId }, renamed)
    },
    { behavior: 'immediate' },
  )
  return getRecord(db, member.firmId, recordId)
}

import { and, desc, eq } from 'drizzle-orm'
import type { z } from 'zod'
import type { StoredTarget } from '../../shared/schemas/comparisons.js'
import {
  type Target,
  type TargetDefinitionValue,
  type TargetPreview,
  type createTargetBodySchema,
  targetDefinitionSchema,
  type targetInputSchema,
  type targetPreviewBodySchema,
} from '../../shared/schemas/targets.js'
import { defaultPeriodsS } from '../../shared/spectra/periods.js'
import { TargetCsvError, parseTargetCsv } from '../../shared/spectra/targetCsv.js'
import { evaluateTarget } from '../../shared/spectra/targets.js'
import type { Db, Tx } from '../db/client.js'
import { targets, users } from '../db/schema.js'
import { createdByColumns, foldCreatedBy } from '../db/createdBy.js'
import { badRequest, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { resolveProject } from './projects.js'

type TargetInputValue = z.output<typeof targetInputSchema>
type CreateTargetInput = z.output<typeof createTargetBodySchema>

/** Turns what a client sent into a definition: CSV text is parsed (400 naming the line). */
export function targetDefinitionFrom(input: TargetInputValue): TargetDefinitionValue {
  if (input.kind !== 'user-csv') return input
  try {
    const points = parseTargetCsv(input.csv)
    return targetDefinitionSchema.parse({
      kind: 'user',
      ...points,
      ...(input.source ? { source: input.source } : {}),
    })
  } catch (err) {
    if (err instanceof TargetCsvError) {
      throw badRequest(err.message, 'invalid_target_csv', err.line === undefined ? {} : { line: err.line })
    }
    throw err
  }
}

/** NaN (undefined ordinate) travels as null in JSON. */
export const nullIfNaN = (values: ArrayLike<number>): (number | null)[] =>
  Array.from(values, (v) => (Number.isFinite(v) ? v : null))

/** Evaluates a target at the given periods (the default grid if none), for the live preview. */
export function previewTarget(body: z.output<typeof targetPreviewBodySchema>): TargetPreview {
  const { periodsS: requested, ...input } = body
  const definition = targetDefinitionFrom(input)
  const periodsS = requested ?? defaultPeriodsS()
  const evaluated = evaluateTarget(definition, periodsS)
  return {
    periodsS: Array.from(periodsS),
    saG: nullIfNaN(evaluated.saG),
    label: evaluated.label,
    notes: evaluated.notes,
    beyondDefinedRange: evaluated.beyondDefinedRange,
    definition,
  }
}

/** The label of a definition, as the chart legend shows it. */
export function targetLabel(definition: TargetDefinitionValue): string {
  return evaluateTarget(definition, []).label
}

const targetColumns = {
  id: targets.id,
  projectId: targets.projectId,
  name: targets.name,
  definition: targets.definition,
  ...createdByColumns(targets.createdBy),
  createdAt: targets.createdAt,
}

type TargetRow = { definition: Record<string, unknown>; createdById: string; createdByName: string } & Omit<
  Target,
  'definition' | 'createdBy' | 'label'
>

function toTarget(row: TargetRow): Target {
  const definition = targetDefinitionSchema.parse(row.definition)
  return { ...foldCreatedBy(row), definition, label: targetLabel(definition) }
}

/** The firm's saved targets, newest first, optionally of one project. */
export function listTargets(db: Db, firmId: string, projectId?: string): Target[] {
  return db
    .select(targetColumns)
    .from(targets)
    .innerJoin(users, eq(users.id, targets.createdBy))
    .where(and(eq(targets.firmId, firmId), projectId ? eq(targets.projectId, projectId) : undefined))
    .orderBy(desc(targets.createdAt))
    .limit(500)
    .all()
    .map(toTarget)
}

/** One saved target of the firm; another firm's id answers 404. */
export function getTarget(db: Tx, firmId: string, targetId: string): Target {
  const row = db
    .select(targetColumns)
    .from(targets)
    .innerJoin(users, eq(users.id, targets.createdBy))
    .where(and(eq(targets.firmId, firmId), eq(targets.id, targetId)))
    .get()
  if (!row) throw notFound('The target')
  return toTarget(row)
}

/** Saves a target in a project (the firm's default project if none is given). */
export function createTarget(db: Db, member: Member, body: CreateTargetInput): Target {
  const definition = targetDefinitionFrom(body.definition)
  const id = newId()
  db.transaction((tx) => {
    const project = resolveProject(tx, member.firmId, body.projectId)
    tx.insert(targets)
      .values({
        id,
        firmId: member.firmId,
        projectId: project.id,
        name: body.name,
        definition,
        createdBy: member.userId,
        createdAt: Date.now(),
      })
      .run()
    recordAudit(tx, {
      firmId: member.firmId,
      userId: member.userId,
      action: 'target.created',
      subjectType: 'target',
      subjectId: id,
      detail: { name: body.name, kind: definition.kind },
    })
  })
  return getTarget(db, member.firmId, id)
}

/** What a comparison stores for a target given by id or inline. */
export function resolveComparisonTarget(
  db: Tx,
  firmId: string,
  input: { targetId: string } | TargetInputValue,
): StoredTarget {
  if ('targetId' in input) {
    const saved = getTarget(db, firmId, input.targetId)
    return { definition: saved.definition, targetId: saved.id, name: saved.name }
  }
  return { definition: targetDefinitionFrom(input) }
}

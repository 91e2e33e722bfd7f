import { and, desc, eq, or } from 'drizzle-orm'
import { isVerticalComponent, sameTimeStep } from '../../shared/pairRules.js'
import type { CreateRecordPairBody, RecordPair, RecordPairDetail } from '../../shared/schemas/recordPairs.js'
import type { Db } from '../db/client.js'
import { recordPairs, runs } from '../db/schema.js'
import { badRequest, conflict, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { auditAction } from './audit.js'
import { resolveOpenProject } from './projects.js'
import { getRecord } from './records.js'

/**
 * Marks two of the firm's horizontal records as a pair for two-component spectra. They must
 * differ, share the time step and the number of points, and sit in the same project; each
 * mismatch answers 400 naming it. Another firm's record answers 404.
 */
export function createRecordPair(
  db: Db,
  member: Pick<Member, 'userId' | 'firmId'>,
  input: CreateRecordPairBody,
): RecordPair {
  const [id1, id2] = input.recordIds
  if (id1 === id2) throw badRequest('A pair needs two different records.', 'pair_same_record')
  const r1 = getRecord(db, member.firmId, id1)
  const r2 = getRecord(db, member.firmId, id2)
  for (const r of [r1, r2]) {
    if (isVerticalComponent(r.component)) {
      throw badRequest(
        `"${r.name}" is marked as component ${r.component} (vertical); a pair is two horizontal components.`,
        'pair_not_horizontal',
      )
    }
  }
  if (!sameTimeStep(r1.dtS, r2.dtS)) {
    throw badRequest(
      `The time steps differ: "${r1.name}" has Δt = ${r1.dtS} s and "${r2.name}" has Δt = ${r2.dtS} s.`,
      'pair_dt_mismatch',
    )
  }
  if (r1.points !== r2.points) {
    throw badRequest(
      `The lengths differ: "${r1.name}" has ${r1.points} points and "${r2.name}" has ${r2.points}.`,
      'pair_length_mismatch',
    )
  }
  if (r1.projectId !== r2.projectId) {
    throw badRequest(
      `The records are in different projects ("${r1.projectName}" and "${r2.projectName}"); pair records of one project.`,
      'pair_project_mismatch',
    )
  }
  const pair: RecordPair = {
    id: newId(),
    recordIds: [id1, id2],
    name: input.name ?? `${r1.name} + ${r2.name}`,
  }
  db.transaction(
    (tx) => {
      resolveOpenProject(tx, member.firmId, r1.projectId, 'record pairs')
      const existing = tx
        .select({ name: recordPairs.name })
        .from(recordPairs)
        .where(
          and(
            eq(recordPairs.firmId, member.firmId),
            or(
              and(eq(recordPairs.record1Id, id1), eq(recordPairs.record2Id, id2)),
              and(eq(recordPairs.record1Id, id2), eq(recordPairs.record2Id, id1)),
            ),
          ),
        )
        .get()
      if (existing)
        throw conflict(`These two records are already paired as "${existing.name}".`, 'pair_exists')
      tx.insert(recordPairs)
        .values({
          id: pair.id,
          firmId: member.firmId,
          projectId: r1.projectId,
          name: pair.name,
          record1Id: id1,
          record2Id: id2,
          createdBy: member.userId,
        })
        .run()
      auditAction(
        tx,
        member,
        'record_pair.created',
        { type: 'record_pair', id: pair.id },
        { name: pair.name, recordIds: pair.recordIds },
      )
    },
    { behavior: 'immediate' },
  )
  return pair
}

/** The firm's pairs, newest first. */
export function listRecordPairs(db: Db, firmId: string): RecordPairDetail[] {
  return db
    .select()
    .from(recordPairs)
    .where(eq(recordPairs.firmId, firmId))
    .orderBy(desc(recordPairs.createdAt))
    .all()
    .map((p) => ({
      id: p.id,
      recordIds: [p.record1Id, p.record2Id] as [string, string],
      name: p.name,
      projectId: p.projectId,
      createdBy: p.createdBy,
      createdAt: p.createdAt,
    }))
}

/**
 * Removes one of the firm's pairs (its two records stay). Refused with 409 while any run
 * uses the pair, since that run's spectrum and sheet name it; another firm's pair answers 404.
 */
export function removeRecordPair(db: Db, member: Pick<Member, 'userId' | 'firmId'>, id: string): void {
  db.transaction(
    (tx) => {
      const pair = tx
        .select({ name: recordPairs.name })
        .from(recordPairs)
        .where(and(eq(recordPairs.firmId, member.firmId), eq(recordPairs.id, id)))
        .get()
      if (!pair) throw notFound('The pair')
      const used = tx.select({ id: runs.id }).from(runs).where(eq(runs.pairId, id)).all()
      if (used.length > 0) {
        throw conflict(
          `"${pair.name}" has ${used.length === 1 ? 'a run' : `${used.length} runs`}; a pair that a run uses cannot be deleted.`,
          'pair_in_use',
        )
      }
      tx.delete(recordPairs).where(eq(recordPairs.id, id)).run()
      auditAction(tx, member, 'record_pair.removed', { type: 'record_pair', id }, { name: pair.name })
    },
    { behavior: 'immediate' },
  )
}

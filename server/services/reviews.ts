import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm'
import type {
  Review,
  ReviewComment,
  ReviewCommentBody,
  ReviewDecisionBody,
  ReviewDetail,
  ReviewListQuery,
  ReviewState,
  ReviewSubjectType,
  SubmitReviewBody,
} from '../../shared/schemas/reviews.js'
import { may, mayEditWork } from '../../shared/permissions.js'
import type { Role } from '../../shared/schemas/accounts.js'
import type { Db, Tx } from '../db/client.js'
import {
  auditLog,
  comparisons,
  memberships,
  recordPairs,
  records,
  reviewComments,
  reviews,
  runs,
  users,
} from '../db/schema.js'
import { conflict, forbidden, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { appLink } from '../mail/links.js'
import { type ReviewNotice, reviewNoticeMail } from '../mail/templates.js'
import { auditAction } from './audit.js'
import { enqueueMail } from './mail.js'

/** The work a review is about, as the review rules need it. */
interface Subject {
  type: ReviewSubjectType
  id: string
  name: string
  createdBy: string
  revision: number
  /** Everyone whose runs are part of the work: the run's author, or every run's author of a comparison. */
  ranBy: string[]
  /** Runs must have succeeded before they can be checked. */
  ready: boolean
}

/** The firm's runs as review work: who made them, their state, revision and the name of what they ran. */
function selectRuns(db: Tx, firmId: string, where: SQL) {
  return db
    .select({
      id: runs.id,
      createdBy: runs.createdBy,
      status: runs.status,
      revision: runs.revision,
      name: sql<string>`coalesce(${records.name}, ${recordPairs.name}, '')`,
    })
    .from(runs)
    .leftJoin(records, eq(records.id, runs.recordId))
    .leftJoin(recordPairs, eq(recordPairs.id, runs.pairId))
    .where(and(eq(runs.firmId, firmId), where))
}

/** The firm's comparisons as review work (whole rows: a comparison row is small). */
function selectComparisons(db: Tx, firmId: string, where: SQL) {
  return db
    .select()
    .from(comparisons)
    .where(and(eq(comparisons.firmId, firmId), where))
}

function loadSubject(db: Tx, firmId: string, type: ReviewSubjectType, id: string): Subject {
  if (type === 'run') {
    const run = selectRuns(db, firmId, eq(runs.id, id)).get()
    if (!run) throw notFound('The run')
    return {
      type,
      id,
      name: run.name,
      createdBy: run.createdBy,
      revision: run.revision,
      ranBy: [run.createdBy],
      ready: run.status === 'succeeded',
    }
  }
  const comparison = selectComparisons(db, firmId, eq(comparisons.id, id)).get()
  if (!comparison) throw notFound('The comparison')
  const runAuthors =
    comparison.runIds.length === 0
      ? []
      : db
          .select({ createdBy: runs.createdBy })
          .from(runs)
          .where(and(eq(runs.firmId, firmId), inArray(runs.id, comparison.runIds)))
          .all()
          .map((r) => r.createdBy)
  return {
    type,
    id,
    name: comparison.name,
    createdBy: comparison.createdBy,
    revision: comparison.revision,
    ranBy: runAuthors,
    ready: true,
  }
}

/** Review states of several subjects of one type; subjects never submitted are 'draft'. */
export function reviewStates(
  db: Tx,
  firmId: string,
  subjectType: ReviewSubjectType,
  subjectIds: string[],
): Map<string, ReviewState> {
  const states = new Map<string, ReviewState>(subjectIds.map((id) => [id, 'draft']))
  if (subjectIds.length === 0) return states
  const rows = db
    .select({ subjectId: reviews.subjectId, state: reviews.state })
    .from(reviews)
    .where(
      and(
        eq(reviews.firmId, firmId),
        eq(reviews.subjectType, subjectType),
        inArray(reviews.subjectId, subjectIds),
      ),
    )
    .all()
  for (const r of rows) states.set(r.subjectId, r.state)
  return states
}

export function reviewStateOf(
  db: Tx,
  firmId: string,
  subjectType: ReviewSubjectType,
  subjectId: string,
): ReviewState {
  return reviewStates(db, firmId, subjectType, [subjectId]).get(subjectId) ?? 'draft'
}

/**
 * Refuses a change to review work that shared/permissions.ts (WORK_EDITING) does not allow:
 * submitted work waits for a decision (409 under_review), checked work is locked (409 locked),
 * and otherwise the member's roles decide (403), so a checker changes only drafts they made.
 * Answers the state the work is in, so the caller can raise the revision of returned work.
 */
export function assertMayEdit(
  db: Tx,
  member: Member,
  subject: { type: ReviewSubjectType; id: string; createdBy: string },
): ReviewState {
  const state = reviewStateOf(db, member.firmId, subject.type, subject.id)
  const what = subject.type === 'run' ? 'run' : 'comparison'
  if (state === 'checked') {
    throw conflict(`This ${what} has been checked and is locked. Make a new revision instead.`, 'locked')
  }
  if (state === 'submitted') {
    throw conflict(
      `This ${what} is waiting for a checker's decision; it can change once it is returned.`,
      'under_review',
    )
  }
  if (!mayEditWork(member, { state, createdBy: subject.createdBy })) {
    throw forbidden(
      state === 'returned'
        ? `This ${what} was returned to the engineer who made it; only an engineer may change it now, and its checker never does.`
        : `A checker changes only work they made; this ${what} was made by someone else.`,
    )
  }
  return state
}

/**
 * Notes in the review thread that returned work was changed, and which revision that made, so
 * the checker sees what they are deciding on. Work never submitted has no thread.
 */
export function noteRevision(
  tx: Tx,
  member: Member,
  subject: { type: ReviewSubjectType; id: string },
  revision: number,
  changed: string[],
): void {
  const review = tx
    .select({ id: reviews.id })
    .from(reviews)
    .where(and(eq(reviews.subjectType, subject.type), eq(reviews.subjectId, subject.id)))
    .get()
  if (!review) return
  const fields = changed.length ? ` (changed: ${changed.join(', ')})` : ''
  insertComment(tx, review.id, member.userId, `Revision ${revision} saved${fields}.`, Date.now())
}

function people(db: Tx, ids: (string | null)[]): Map<string, { id: string; name: string }> {
  const wanted = [...new Set(ids.filter((id): id is string => !!id))]
  if (wanted.length === 0) return new Map()
  const rows = db
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(inArray(users.id, wanted))
    .all()
  return new Map(rows.map((r) => [r.id, r]))
}

const reviewColumns = {
  id: reviews.id,
  subjectType: reviews.subjectType,
  subjectId: reviews.subjectId,
  state: reviews.state,
  submittedBy: reviews.submittedBy,
  submittedAt: reviews.submittedAt,
  decidedBy: reviews.decidedBy,
  decidedAt: reviews.decidedAt,
  createdAt: reviews.createdAt,
  // Written out in full: inside a select from reviews, drizzle would leave ${reviews.id} unqualified.
  commentCount: sql<number>`(select count(*) from review_comments rc where rc.review_id = "reviews"."id")`,
}

type ReviewRow = Awaited<ReturnType<ReturnType<typeof selectReviews>['all']>>[number]

function selectReviews(db: Tx, where: SQL | undefined) {
  return db.select(reviewColumns).from(reviews).where(where)
}

/** Adds names of people and subjects to review rows, with a handful of queries for the whole list. */
function toReviews(db: Tx, firmId: string, rows: ReviewRow[]): Review[] {
  const runIds = rows.filter((r) => r.subjectType === 'run').map((r) => r.subjectId)
  const comparisonIds = rows.filter((r) => r.subjectType === 'comparison').map((r) => r.subjectId)
  const subjects = new Map<string, { name: string; createdBy: string; revision: number }>()
  if (runIds.length > 0) {
    selectRuns(db, firmId, inArray(runs.id, runIds))
      .all()
      .forEach((s) => subjects.set(`run:${s.id}`, s))
  }
  if (comparisonIds.length > 0) {
    selectComparisons(db, firmId, inArray(comparisons.id, comparisonIds))
      .all()
      .forEach((s) => subjects.set(`comparison:${s.id}`, s))
  }
  const names = people(db, [
    ...rows.flatMap((r) => [r.submittedBy, r.decidedBy]),
    ...[...subjects.values()].map((s) => s.createdBy),
  ])
  const person = (id: string) => names.get(id) ?? { id, name: '' }
  return rows.map((r) => {
    const subject = subjects.get(`${r.subjectType}:${r.subjectId}`)
    return {
      ...r,
      subjectName: subject?.name ?? '',
      subjectAuthor: person(subject?.createdBy ?? ''),
      subjectRevision: subject?.revision ?? 1,
      submittedBy: person(r.submittedBy),
      decidedBy: r.decidedBy ? person(r.decidedBy) : null,
    }
  })
}

/** The firm's reviews, newest activity first, filtered by state, submitter or subject. */
export function listReviews(db: Db, member: Member, query: ReviewListQuery, limit = 500): Review[] {
  const where = and(
    eq(reviews.firmId, member.firmId),
    query.state ? eq(reviews.state, query.state) : undefined,
    query.mine === 'true' ? eq(reviews.submittedBy, member.userId) : undefined,
    query.subjectType ? eq(reviews.subjectType, query.subjectType) : undefined,
    query.subjectId ? eq(reviews.subjectId, query.subjectId) : undefined,
  )
  const rows = selectReviews(db, where)
    .orderBy(desc(sql`coalesce(${reviews.decidedAt}, ${reviews.submittedAt})`), desc(reviews.id))
    .limit(limit)
    .all()
  return toReviews(db, member.firmId, rows)
}

/** One review with its comment thread, oldest first; another firm's id answers 404. */
export function getReview(db: Tx, firmId: string, reviewId: string): ReviewDetail {
  const row = selectReviews(db, and(eq(reviews.firmId, firmId), eq(reviews.id, reviewId))).get()
  if (!row) throw notFound('The review')
  const [review] = toReviews(db, firmId, [row])
  const commentRows = db
    .select({
      id: reviewComments.id,
      authorId: reviewComments.authorId,
      body: reviewComments.body,
      createdAt: reviewComments.createdAt,
    })
    .from(reviewComments)
    .where(eq(reviewComments.reviewId, reviewId))
    .orderBy(asc(reviewComments.createdAt), asc(sql`rowid`))
    .all()
  const names = people(
    db,
    commentRows.map((c) => c.authorId),
  )
  const comments: ReviewComment[] = commentRows.map(({ authorId, ...c }) => ({
    ...c,
    author: names.get(authorId) ?? { id: authorId, name: '' },
  }))
  return { ...(review as Review), comments }
}

function insertComment(tx: Tx, reviewId: string, authorId: string, body: string, at: number): string {
  const id = newId()
  tx.insert(reviewComments).values({ id, reviewId, authorId, body, createdAt: at }).run()
  return id
}

/**
 * Queues the review notice of issue 15 in the outbox, inside the decision's transaction so it is
 * sent only if the decision commits: submitted work to every checker of the firm except the
 * member acting, returned or checked work to the engineer who submitted it.
 */
function queueNotices(
  tx: Tx,
  member: Member,
  subject: Subject,
  notice: ReviewNotice,
  recipients: { email: string; name: string }[],
  origin: string,
  comment?: string,
): void {
  for (const to of recipients) {
    enqueueMail(tx, {
      to: to.email,
      ...reviewNoticeMail({
        notice,
        recipientName: to.name,
        actorName: member.name,
        firmName: member.firmName,
        subjectKind: subject.type,
        subjectName: subject.name,
        revision: subject.revision,
        comment,
        url: appLink(origin, `/${subject.type === 'run' ? 'runs' : 'comparisons'}/${subject.id}`),
      }),
    })
  }
}

/** The firm's members who may decide on reviews (shared/permissions.ts), but not `except`. */
function checkersOf(tx: Tx, firmId: string, except: string): { email: string; name: string }[] {
  return tx
    .select({ userId: users.id, email: users.email, name: users.name, roles: memberships.roles })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.firmId, firmId))
    .all()
    .filter((m) => m.userId !== except && may(m.roles as Role[], 'reviews.decide'))
    .map(({ email, name }) => ({ email, name }))
}

/**
 * Submits a run or comparison for checking: draft → submitted, or returned → submitted again.
 * Engineers submit their own work only; a run must have succeeded. Writes the audit row in the
 * same transaction. Answers the review and whether it was created (201) or resubmitted (200).
 */
export function submitReview(
  db: Db,
  member: Member,
  body: SubmitReviewBody,
  origin: string,
): { review: ReviewDetail; created: boolean } {
  const { reviewId, created } = db.transaction(
    (tx) => {
      const subject = loadSubject(tx, member.firmId, body.subjectType, body.subjectId)
      if (subject.createdBy !== member.userId) {
        throw forbidden(`You can submit only your own work; this ${subject.type} was made by someone else.`)
      }
      if (!subject.ready)
        throw conflict('Only a run that has succeeded can be submitted for checking.', 'run_not_finished')
      const existing = tx
        .select({ id: reviews.id, state: reviews.state })
        .from(reviews)
        .where(and(eq(reviews.subjectType, body.subjectType), eq(reviews.subjectId, body.subjectId)))
        .get()
      if (existing?.state === 'submitted')
        throw conflict('This work is already waiting for a checker.', 'already_submitted')
      if (existing?.state === 'checked') {
        throw conflict('This work has been checked and is locked. Make a new revision instead.', 'locked')
      }
      const now = Date.now()
      const id = existing?.id ?? newId()
      if (existing) {
        tx.update(reviews)
          .set({
            state: 'submitted',
            submittedBy: member.userId,
            submittedAt: now,
            decidedBy: null,
            decidedAt: null,
          })
          .where(eq(reviews.id, id))
          .run()
      } else {
        tx.insert(reviews)
          .values({
            id,
            firmId: member.firmId,
            subjectType: body.subjectType,
            subjectId: body.subjectId,
            state: 'submitted',
            submittedBy: member.userId,
            submittedAt: now,
            createdAt: now,
          })
          .run()
      }
      auditAction(
        tx,
        member,
        existing ? 'review.resubmitted' : 'review.submitted',
        { type: body.subjectType, id: body.subjectId },
        {
          reviewId: id,
          from: existing?.state ?? 'draft',
          to: 'submitted',
          subjectName: subject.name,
          revision: subject.revision,
        },
      )
      queueNotices(tx, member, subject, 'submitted', checkersOf(tx, member.firmId, member.userId), origin)
      return { reviewId: id, created: !existing }
    },
    { behavior: 'immediate' },
  )
  return { review: getReview(db, member.firmId, reviewId), created }
}

/** Whether the member ever created or changed the subject (the audit log keeps every change). */
function changedSubject(tx: Tx, member: Member, type: ReviewSubjectType, id: string): boolean {
  const actions = type === 'run' ? ['run.created'] : ['comparison.created', 'comparison.updated']
  const row = tx
    .select({ id: auditLog.id })
    .from(auditLog)
    .where(
      and(
        eq(auditLog.firmId, member.firmId),
        eq(auditLog.userId, member.userId),
        eq(auditLog.subjectType, type),
        eq(auditLog.subjectId, id),
        inArray(auditLog.action, actions),
      ),
    )
    .get()
  return row !== undefined
}

/**
 * A checker's decision: submitted → checked, or submitted → returned (with a comment). Nobody
 * decides on work they submitted, made, or ran (for a comparison: any of its runs).
 */
export function decideReview(
  db: Db,
  member: Member,
  reviewId: string,
  body: ReviewDecisionBody,
  origin: string,
): ReviewDetail {
  db.transaction(
    (tx) => {
      const review = tx
        .select({
          state: reviews.state,
          subjectType: reviews.subjectType,
          subjectId: reviews.subjectId,
          submittedBy: reviews.submittedBy,
        })
        .from(reviews)
        .where(and(eq(reviews.firmId, member.firmId), eq(reviews.id, reviewId)))
        .get()
      if (!review) throw notFound('The review')
      const subject = loadSubject(tx, member.firmId, review.subjectType, review.subjectId)
      if (review.submittedBy === member.userId || subject.createdBy === member.userId) {
        throw forbidden('You cannot check work you submitted or made yourself; another checker must decide.')
      }
      if (subject.ranBy.includes(member.userId)) {
        throw forbidden('You ran part of this work yourself, so another checker must decide.')
      }
      if (changedSubject(tx, member, review.subjectType, review.subjectId)) {
        throw forbidden('You changed this work yourself, so another checker must decide.')
      }
      if (review.state !== 'submitted') {
        throw conflict(`This review is ${review.state}, not waiting for a decision.`, 'not_submitted')
      }
      const now = Date.now()
      tx.update(reviews)
        .set({ state: body.decision, decidedBy: member.userId, decidedAt: now })
        .where(eq(reviews.id, reviewId))
        .run()
      const commentId = body.comment
        ? insertComment(tx, reviewId, member.userId, body.comment, now)
        : undefined
      auditAction(
        tx,
        member,
        `review.${body.decision}`,
        { type: review.subjectType, id: review.subjectId },
        { reviewId, from: 'submitted', to: body.decision, commentId, revision: subject.revision },
      )
      const engineer = tx
        .select({ email: users.email, name: users.name })
        .from(users)
        .where(eq(users.id, review.submittedBy))
        .get()
      queueNotices(tx, member, subject, body.decision, engineer ? [engineer] : [], origin, body.comment)
    },
    { behavior: 'immediate' },
  )
  return getReview(db, member.firmId, reviewId)
}

/** Adds a comment to a review's thread. */
export function addReviewComment(
  db: Db,
  member: Member,
  reviewId: string,
  body: ReviewCommentBody,
): ReviewComment {
  const at = Date.now()
  const id = db.transaction(
    (tx) => {
      const review = tx
        .select({ subjectType: reviews.subjectType, subjectId: reviews.subjectId })
        .from(reviews)
        .where(and(eq(reviews.firmId, member.firmId), eq(reviews.id, reviewId)))
        .get()
      if (!review) throw notFound('The review')
      const commentId = insertComment(tx, reviewId, member.userId, body.body, at)
      auditAction(
        tx,
        member,
        'review.commented',
        { type: review.subjectType, id: review.subjectId },
        { reviewId, commentId },
      )
      return commentId
    },
    { behavior: 'immediate' },
  )
  return { id, author: { id: member.userId, name: member.name }, body: body.body, createdAt: at }
}

import { parseStored } from '../db/parseStored.js'
import { CAUTION } from '../../shared/cautions.js'
import { and, desc, eq, inArray, sql } from 'drizzle-orm'
import { z } from 'zod'
import type {
  Combination,
  ComparisonDrawing,
  ComparisonSummary,
  ComparisonView,
  MeanKind,
  StoredTarget,
  SuiteStatisticsView,
  createComparisonBodySchema,
  previewComparisonBodySchema,
  updateComparisonBodySchema,
} from '../../shared/schemas/comparisons.js'
import { storedScalingSchema, storedTargetSchema } from '../../shared/schemas/comparisons.js'
import {
  type ScalingRule,
  SCALING_RULE_LABELS,
  commonPeriodGrid,
  interpolateLogLog,
  scaleSuite,
  suiteCautions,
  suiteStatistics,
} from '../../shared/spectra/suite.js'
import { sheetReference } from '../../shared/sheets/sheetReference.js'
import { evaluateTarget } from '../../shared/spectra/targets.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import {
  COMBINATION_LABELS,
  MAXIMUM_DIRECTION,
  combinationSchema,
} from '../../shared/vocabulary/combinations.js'
import type { Db, Tx } from '../db/client.js'
import { comparisons, recordPairs, records, runs, spectra, users } from '../db/schema.js'
import { createdByColumns, foldCreatedBy } from '../db/createdBy.js'
import { badRequest, conflict, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { auditAction } from './audit.js'
import { resolveOpenProject } from './projects.js'
import { assertMayEdit, noteRevision, reviewStateOf, reviewStates } from './reviews.js'
import { nullIfNaN, resolveComparisonTarget } from './targets.js'

type CreateInput = z.output<typeof createComparisonBodySchema>
type PreviewInput = z.output<typeof previewComparisonBodySchema>
type UpdateInput = z.output<typeof updateComparisonBodySchema>

export const COMPARISON_CAUTION =
  CAUTION +
  ' The scaling rule shown is a stated calculation, not a claim of compliance with any code clause, and passing it does not make a record suitable for the site.'

/** The part of a stored spectrum a comparison reads (shared/schemas/spectrum.ts holds the full shape). */
const storedSpectrumSchema = z.object({
  periodsS: z.array(z.number()),
  curves: z.array(
    z.object({
      dampingRatio: z.number(),
      combination: combinationSchema.optional(),
      psaMPerS2: z.array(z.number()),
    }),
  ),
})
type StoredSpectrum = z.infer<typeof storedSpectrumSchema>

const sameDamping = (a: number, b: number) => Math.abs(a - b) < 1e-9

const summaryColumns = {
  id: comparisons.id,
  projectId: comparisons.projectId,
  name: comparisons.name,
  runIds: comparisons.runIds,
  dampingRatio: comparisons.dampingRatio,
  meanKind: comparisons.meanKind,
  combination: comparisons.combination,
  target: comparisons.target,
  scaling: comparisons.scaling,
  revision: comparisons.revision,
  revisionOf: comparisons.revisionOf,
  ...createdByColumns(comparisons.createdBy),
  createdAt: comparisons.createdAt,
  updatedAt: comparisons.updatedAt,
}

function selectSummaries(db: Tx) {
  return db.select(summaryColumns).from(comparisons).innerJoin(users, eq(users.id, comparisons.createdBy))
}

type SummaryRow = Awaited<ReturnType<ReturnType<typeof selectSummaries>['all']>>[number]

function toSummary(row: SummaryRow, reviewState: ComparisonSummary['reviewState']): ComparisonSummary {
  const { target, scaling } = row
  return {
    ...foldCreatedBy(row),
    target: target ? parseStored(storedTargetSchema, target, 'comparison target') : null,
    scaling: scaling ? parseStored(storedScalingSchema, scaling, 'comparison scaling') : null,
    reviewState,
  }
}

/** The firm's comparisons, newest first, each with its review state. */
export function listComparisons(db: Db, firmId: string, projectId?: string): ComparisonSummary[] {
  const rows = selectSummaries(db)
    .where(and(eq(comparisons.firmId, firmId), projectId ? eq(comparisons.projectId, projectId) : undefined))
    .orderBy(desc(sql`coalesce(${comparisons.updatedAt}, ${comparisons.createdAt})`), desc(comparisons.id))
    .limit(500)
    .all()
  const states = reviewStates(
    db,
    firmId,
    'comparison',
    rows.map((r) => r.id),
  )
  return rows.map((r) => toSummary(r, states.get(r.id) ?? 'draft'))
}

/** One comparison of the firm; another firm's id answers 404. */
export function getComparison(db: Tx, firmId: string, id: string): ComparisonSummary {
  const row = selectSummaries(db)
    .where(and(eq(comparisons.firmId, firmId), eq(comparisons.id, id)))
    .get()
  if (!row) throw notFound('The comparison')
  return toSummary(row, reviewStateOf(db, firmId, 'comparison', id))
}

interface LoadedRun {
  id: string
  projectId: string
  name: string
  revision: number
  pair: boolean
  /** The record, or the pair's two components, for the suite's cautions. */
  records: { id: string; name: string }[]
  spectrum: StoredSpectrum
}

/** The runs of a comparison, in the order given; each must be the firm's and have succeeded. */
function loadRuns(db: Tx, firmId: string, runIds: string[]): LoadedRun[] {
  const rows = db
    .select({
      id: runs.id,
      projectId: runs.projectId,
      status: runs.status,
      pairId: runs.pairId,
      recordId: runs.recordId,
      recordName: records.name,
      component1Id: recordPairs.record1Id,
      component2Id: recordPairs.record2Id,
      revision: runs.revision,
      name: sql<string>`coalesce(${records.name}, ${recordPairs.name}, '')`,
      result: spectra.result,
    })
    .from(runs)
    .leftJoin(records, eq(records.id, runs.recordId))
    .leftJoin(recordPairs, eq(recordPairs.id, runs.pairId))
    .leftJoin(spectra, eq(spectra.runId, runs.id))
    .where(and(eq(runs.firmId, firmId), inArray(runs.id, runIds)))
    .all()
  const byId = new Map(rows.map((r) => [r.id, r]))
  const componentIds = rows.flatMap((r) => (r.pairId ? [r.component1Id!, r.component2Id!] : []))
  const componentNames = new Map(
    componentIds.length === 0
      ? []
      : db
          .select({ id: records.id, name: records.name })
          .from(records)
          .where(inArray(records.id, componentIds))
          .all()
          .map((r) => [r.id, r.name]),
  )
  const component = (id: string | null) => ({ id: id!, name: componentNames.get(id!) ?? '' })
  return runIds.map((id) => {
    const row = byId.get(id)
    if (!row) throw notFound(`The run ${id}`)
    if (row.status !== 'succeeded' || !row.result) {
      throw conflict(
        `The run of “${row.name}” has not succeeded, so it has no spectrum to compare.`,
        'run_not_finished',
      )
    }
    // A stored spectrum that does not read is our fault: the one 500 of every stored-data failure.
    const spectrum = parseStored(storedSpectrumSchema, row.result, 'spectrum')
    return {
      id,
      projectId: row.projectId,
      name: row.name,
      revision: row.revision,
      pair: !!row.pairId,
      records: row.pairId
        ? [component(row.component1Id), component(row.component2Id)]
        : [{ id: row.recordId!, name: row.recordName ?? row.name }],
      spectrum,
    }
  })
}

/** Which combination a pair run is compared with: the one asked for, else the maximum direction when present. */
function pickCurve(run: LoadedRun, dampingRatio: number, combination: Combination | null) {
  const atDamping = run.spectrum.curves.filter((c) => sameDamping(c.dampingRatio, dampingRatio))
  const damping = `${Number((dampingRatio * 100).toPrecision(6))}%`
  if (atDamping.length === 0) {
    throw badRequest(
      `The run of “${run.name}” has no curve at ${damping} damping; choose a damping ratio every run has.`,
      'damping_not_in_run',
    )
  }
  if (!run.pair) {
    const single = atDamping.find((c) => !c.combination)
    if (!single)
      throw badRequest(
        `The run of “${run.name}” has no single-record curve at ${damping}.`,
        'damping_not_in_run',
      )
    return single
  }
  const wanted =
    combination ??
    (atDamping.some((c) => c.combination === MAXIMUM_DIRECTION)
      ? MAXIMUM_DIRECTION
      : atDamping[0]?.combination)
  const curve = atDamping.find((c) => c.combination === wanted)
  if (!curve) {
    throw badRequest(
      `The pair run of “${run.name}” did not compute ${wanted ?? 'a combination'} at ${damping}.`,
      'combination_not_in_run',
    )
  }
  return curve
}

/** A period-sorted copy of a curve's PSA in g, so lists of periods given in any order still work. */
function sortedPsaG(periods: number[], psaMPerS2: number[]): { periodsS: number[]; psaG: number[] } {
  const order = periods.map((_, i) => i).sort((a, b) => (periods[a] as number) - (periods[b] as number))
  return {
    periodsS: order.map((i) => periods[i] as number),
    psaG: order.map((i) => (psaMPerS2[i] as number) / STANDARD_GRAVITY_M_PER_S2),
  }
}

function statsView(stats: ReturnType<typeof suiteStatistics>): SuiteStatisticsView {
  return {
    kind: stats.kind,
    label: stats.label,
    meanG: nullIfNaN(stats.mean),
    lowerG: stats.lower ? nullIfNaN(stats.lower) : null,
    upperG: stats.upper ? nullIfNaN(stats.upper) : null,
  }
}

function disambiguate(labels: string[], runIds: string[]): string[] {
  const counts = new Map<string, number>()
  for (const l of labels) counts.set(l, (counts.get(l) ?? 0) + 1)
  return labels.map((l, i) =>
    (counts.get(l) ?? 0) > 1 ? `${l} (${sheetReference('run', runIds[i] ?? '')})` : l,
  )
}

/** Rethrows a numeric RangeError (an impossible range, a target undefined there) as a 400. */
function asBadRequest<T>(fn: () => T): T {
  try {
    return fn()
  } catch (err) {
    if (err instanceof RangeError)
      throw badRequest(`${err.message.charAt(0).toUpperCase()}${err.message.slice(1)}.`, 'invalid_comparison')
    throw err
  }
}

interface ComparisonInputs {
  name: string
  runIds: string[]
  dampingRatio: number
  meanKind: MeanKind
  combination: Combination | null
  target: StoredTarget | null
  scaling: { fromS: number; toS: number; rule: ScalingRule } | null
}

/**
 * The chart and table data of a comparison, computed from its runs' stored spectra:
 * 1. each run's PSA (g) at the damping ratio (and the combination, for pair runs), sorted by period;
 * 2. a common period grid (the runs' own grid when they share one, else 100 per decade over the overlap),
 *    with each curve interpolated log-log onto it;
 * 3. the suite mean and ±1σ (shared/spectra/suite.ts);
 * 4. the target on the grid, and 90% of it;
 * 5. the scale factors and the suite check of the scaling rule.
 */
function computeView(db: Tx, firmId: string, inputs: ComparisonInputs) {
  const loaded = loadRuns(db, firmId, inputs.runIds)
  const curves = loaded.map((run) => {
    const curve = pickCurve(run, inputs.dampingRatio, inputs.combination)
    return { run, combination: curve.combination, ...sortedPsaG(run.spectrum.periodsS, curve.psaMPerS2) }
  })
  return asBadRequest(() => {
    const grid = commonPeriodGrid(curves.map((c) => c.periodsS))
    const onGrid = curves.map((c) =>
      c.periodsS.length === grid.length && c.periodsS.every((t, i) => t === grid[i])
        ? Float64Array.from(c.psaG)
        : interpolateLogLog(c.periodsS, c.psaG, grid),
    )
    const unscaled = suiteStatistics(onGrid, inputs.meanKind)
    const target = inputs.target ? evaluateTarget(inputs.target.definition, grid) : null
    const scaling =
      inputs.scaling && target
        ? scaleSuite(grid, onGrid, target.saG, { ...inputs.scaling, meanKind: inputs.meanKind })
        : null
    if (inputs.scaling && !target) throw new RangeError('scaling needs a target to scale to')
    return { curves, grid, onGrid, unscaled, target, scaling }
  })
}

function buildDrawing(
  summary: ComparisonInputs,
  computed: ReturnType<typeof computeView>,
): ComparisonDrawing {
  const { curves, grid, onGrid, unscaled, target, scaling } = computed
  const labels = disambiguate(
    curves.map((c) => {
      const base = c.run.revision > 1 ? `${c.run.name} (rev ${c.run.revision})` : c.run.name
      return c.combination ? `${base}, ${COMBINATION_LABELS[c.combination]}` : base
    }),
    curves.map((c) => c.run.id),
  )
  const scaledStats = scaling
    ? suiteStatistics(
        onGrid.map((c, k) => c.map((v) => v * (scaling.factors[k] as number))),
        summary.meanKind,
      )
    : null
  const target90 = target
    ? Float64Array.from(target.saG, (v, i) => {
        const t = grid[i] as number
        const inRange = !summary.scaling || (t >= summary.scaling.fromS && t <= summary.scaling.toS)
        return inRange ? 0.9 * v : NaN
      })
    : null
  const pairCombinations = [...new Set(curves.map((c) => c.combination).filter((c): c is Combination => !!c))]
  const first = grid[0] as number
  const last = grid[grid.length - 1] as number
  return {
    periodsS: Array.from(grid),
    curves: curves.map((c, k) => ({
      runId: c.run.id,
      label: labels[k] as string,
      ...(c.combination ? { combination: c.combination } : {}),
      revision: c.run.revision,
      psaG: nullIfNaN(onGrid[k] as Float64Array),
      scaleFactor: scaling ? (scaling.factors[k] as number) : null,
    })),
    suite: { unscaled: statsView(unscaled), scaled: scaledStats ? statsView(scaledStats) : null },
    target:
      target && target90
        ? {
            label: summary.target?.name ? `${summary.target.name}: ${target.label}` : target.label,
            notes: target.notes,
            saG: nullIfNaN(target.saG),
            target90G: nullIfNaN(target90),
            beyondDefinedRange: target.beyondDefinedRange,
          }
        : null,
    scaling:
      scaling && summary.scaling
        ? {
            rule: scaling.rule,
            ruleLabel: SCALING_RULE_LABELS[scaling.rule],
            fromS: scaling.fromS,
            toS: scaling.toS,
            check: scaling.check,
          }
        : null,
    labels: {
      title: summary.name,
      damping: `ζ = ${Number((summary.dampingRatio * 100).toPrecision(6))}%`,
      mean: `${summary.meanKind === 'geometric' ? 'Geometric' : 'Arithmetic'} mean of ${curves.length} run${curves.length === 1 ? '' : 's'}`,
      combination: pairCombinations.length
        ? `Pairs combined as ${pairCombinations.map((c) => COMBINATION_LABELS[c]).join(', ')}`
        : null,
      grid: `${grid.length} periods from ${first} s to ${last} s`,
    },
    suiteCautions: suiteCautions(
      curves.map((c, k) => ({ label: labels[k] as string, records: c.run.records, pair: c.run.pair })),
      summary.target?.definition.kind ?? null,
    ),
    caution: COMPARISON_CAUTION,
  }
}

/** Everything the comparison chart and scale-factor table need; the exports use it too. */
export function getComparisonView(db: Tx, firmId: string, id: string): ComparisonView {
  const summary = getComparison(db, firmId, id)
  return { comparison: summary, ...buildDrawing(summary, computeView(db, firmId, summary)) }
}

/** The chart and table data of a comparison that is not saved, for the workspace's live preview. */
export function previewComparison(db: Db, firmId: string, body: PreviewInput): ComparisonDrawing {
  const inputs: ComparisonInputs = {
    name: body.name ?? 'Comparison',
    runIds: body.runIds,
    dampingRatio: body.dampingRatio,
    meanKind: body.meanKind,
    combination: body.combination ?? null,
    target: body.target ? resolveComparisonTarget(db, firmId, body.target) : null,
    scaling: body.scaling ?? null,
  }
  return buildDrawing(inputs, computeView(db, firmId, inputs))
}

function revisionFor(tx: Tx, firmId: string, revisionOf: string | undefined): number {
  if (!revisionOf) return 1
  const previous = tx
    .select({ revision: comparisons.revision })
    .from(comparisons)
    .where(and(eq(comparisons.firmId, firmId), eq(comparisons.id, revisionOf)))
    .get()
  if (!previous) throw notFound('The comparison to revise')
  return previous.revision + 1
}

/**
 * Saves a comparison. Its runs must be the firm's and have succeeded, with a curve at the damping
 * ratio; the view is computed once before saving so a comparison that cannot be drawn is refused.
 */
export function createComparison(db: Db, member: Member, body: CreateInput): ComparisonView {
  const id = newId()
  db.transaction(
    (tx) => {
      const target = body.target ? resolveComparisonTarget(tx, member.firmId, body.target) : null
      const inputs: ComparisonInputs = {
        name: body.name,
        runIds: body.runIds,
        dampingRatio: body.dampingRatio,
        meanKind: body.meanKind,
        combination: body.combination ?? null,
        target,
        scaling: body.scaling ?? null,
      }
      const computed = computeView(tx, member.firmId, inputs)
      const firstRun = computed.curves[0]?.run
      const project = resolveOpenProject(
        tx,
        member.firmId,
        body.projectId ?? firstRun?.projectId,
        'comparisons',
      )
      const now = Date.now()
      tx.insert(comparisons)
        .values({
          id,
          firmId: member.firmId,
          projectId: project.id,
          name: body.name,
          runIds: body.runIds,
          dampingRatio: body.dampingRatio,
          meanKind: body.meanKind,
          combination: inputs.combination,
          target,
          scaling: inputs.scaling,
          revisionOf: body.revisionOf ?? null,
          revision: revisionFor(tx, member.firmId, body.revisionOf),
          createdBy: member.userId,
          createdAt: now,
        })
        .run()
      auditAction(
        tx,
        member,
        'comparison.created',
        { type: 'comparison', id },
        { name: body.name, runs: body.runIds.length, revisionOf: body.revisionOf ?? null },
      )
    },
    { behavior: 'immediate' },
  )
  return getComparisonView(db, member.firmId, id)
}

/**
 * Changes a comparison the member may edit in its review state (shared/permissions.ts; 409 while
 * under review or once checked, 403 for a checker and someone else's work). A change to returned
 * work makes a new revision, which the sheet, the file name and the review thread then show.
 */
export function updateComparison(db: Db, member: Member, id: string, body: UpdateInput): ComparisonView {
  db.transaction(
    (tx) => {
      const current = getComparison(tx, member.firmId, id)
      const subject = { type: 'comparison' as const, id, createdBy: current.createdBy.id }
      const state = assertMayEdit(tx, member, subject)
      const revision = state === 'draft' ? current.revision : current.revision + 1
      const target =
        body.target === undefined
          ? current.target
          : body.target === null
            ? null
            : resolveComparisonTarget(tx, member.firmId, body.target)
      const inputs: ComparisonInputs = {
        name: body.name ?? current.name,
        runIds: body.runIds ?? current.runIds,
        dampingRatio: body.dampingRatio ?? current.dampingRatio,
        meanKind: body.meanKind ?? current.meanKind,
        combination: body.combination === undefined ? current.combination : body.combination,
        target,
        scaling: body.scaling === undefined ? current.scaling : body.scaling,
      }
      computeView(tx, member.firmId, inputs)
      tx.update(comparisons)
        .set({ ...inputs, revision, updatedAt: Date.now() })
        .where(and(eq(comparisons.firmId, member.firmId), eq(comparisons.id, id)))
        .run()
      if (revision !== current.revision) noteRevision(tx, member, subject, revision, Object.keys(body))
      auditAction(
        tx,
        member,
        'comparison.updated',
        { type: 'comparison', id },
        { fields: Object.keys(body), revision },
      )
    },
    { behavior: 'immediate' },
  )
  return getComparisonView(db, member.firmId, id)
}

import { type Ref, computed, reactive, ref, watch } from 'vue'
import { RUN_METHOD_NAMES } from '../../shared/charts/runSpectrumChartInput'
import { dampingLabel } from '../../shared/charts/spectrumChart'
import { sheetReference } from '../../shared/sheets/sheetReference'
import type { ScalingRule } from '../../shared/spectra/suite'
import { COMBINATIONS, COMBINATION_LABELS } from '../../shared/vocabulary/combinations'
import * as comparisonsApi from '@/api/comparisons'
import type {
  Combination,
  ComparisonDrawing,
  ComparisonSummary,
  ComparisonTargetInput,
  MeanKind,
  PreviewComparisonBody,
} from '@/api/comparisons'
import type { Run } from '@/api/runs'
import { useLivePreview } from '@/composables/useLivePreview'
import { formatDateTime } from '@/formatDateTime'

/** How long the inputs must rest before the preview is asked for again. */
const PREVIEW_DELAY_MS = 350

/** What the form edits. */
export interface ComparisonDraftInputs {
  name: string
  runIds: string[]
  dampingRatio: number | null
  meanKind: MeanKind
  /** How pair runs are combined; null leaves the server's default. */
  combination: Combination | null
  target: ComparisonTargetInput | null
  scalingOn: boolean
  fromS: number | null
  toS: number | null
  rule: ScalingRule
  /** The checked comparison this draft revises, if any. */
  revisionOf: string | null
}

/** The stored target of a saved comparison, as the target editor takes it. */
function targetInputOf(stored: ComparisonSummary['target']): ComparisonTargetInput | null {
  if (!stored) return null
  return stored.targetId ? { targetId: stored.targetId } : stored.definition
}

/**
 * A comparison being edited, before it is saved: its inputs, the choices they leave open (the
 * damping ratios every chosen run has, the combinations its pairs have), the request body, and
 * the live drawing from POST /api/comparisons/preview, asked for once the inputs rest. The
 * preview waits while `ready` is false (saved inputs still loading) or `readOnly` is true (locked,
 * or not the member's to change: its inputs do not change, and the saved drawing is shown).
 */
export function useComparisonDraft(options: {
  runs: Ref<Run[]>
  ready: Ref<boolean>
  readOnly: Ref<boolean>
}) {
  const { runs, ready, readOnly } = options

  const draft = reactive<ComparisonDraftInputs>({
    name: '',
    runIds: [],
    dampingRatio: null,
    meanKind: 'arithmetic',
    combination: null,
    target: null,
    scalingOn: false,
    fromS: 0.2,
    toS: 2,
    rule: 'suite-90',
    revisionOf: null,
  })

  const drawing = ref<ComparisonDrawing | null>(null)

  /** Puts a saved comparison's inputs in the fields. */
  function fill(c: ComparisonSummary) {
    Object.assign(draft, {
      name: c.name,
      runIds: [...c.runIds],
      dampingRatio: c.dampingRatio,
      meanKind: c.meanKind,
      combination: c.combination,
      target: targetInputOf(c.target),
      scalingOn: c.scaling !== null,
      ...(c.scaling ? { fromS: c.scaling.fromS, toS: c.scaling.toS, rule: c.scaling.rule } : {}),
    })
  }

  const runOptions = computed(() =>
    runs.value
      .filter((r) => r.status === 'succeeded')
      .map((r) => ({
        value: r.id,
        // In full, so two runs of one record can be told apart: record, settings and time.
        label: [
          `${r.subjectName}${r.pairId ? ' (pair)' : ''}`,
          r.settings.dampingRatios.map(dampingLabel).join(', '),
          RUN_METHOD_NAMES[r.settings.method],
          `${r.settings.periodsS.length} periods${r.settings.periodGrid ? ` ${r.settings.periodGrid.minS}–${r.settings.periodGrid.maxS} s` : ''}`,
          ...(r.settings.combinations
            ? [r.settings.combinations.map((c) => COMBINATION_LABELS[c]).join(', ')]
            : []),
          `${r.createdBy.name}, ${formatDateTime(r.createdAt)}`,
          ...(r.revision > 1 ? [`rev ${r.revision}`] : []),
          // The tag the comparison's legend gives two runs of one record, as their sheets print it.
          sheetReference('run', r.id),
        ].join(' · '),
      })),
  )
  const chosenRuns = computed(() =>
    draft.runIds.map((id) => runs.value.find((r) => r.id === id)).filter((r) => r !== undefined),
  )

  /** Damping ratios every chosen run computed. */
  const dampingOptions = computed(() => {
    const [first, ...rest] = chosenRuns.value
    if (!first) return []
    return first.settings.dampingRatios
      .filter((d) => rest.every((r) => r.settings.dampingRatios.some((e) => Math.abs(e - d) < 1e-9)))
      .map((d) => ({ value: d, label: dampingLabel(d) }))
  })
  watch(dampingOptions, (choices) => {
    if (!ready.value) return
    if (draft.dampingRatio !== null && choices.some((o) => o.value === draft.dampingRatio)) return
    draft.dampingRatio =
      choices.find((o) => Math.abs(o.value - 0.05) < 1e-9)?.value ?? choices[0]?.value ?? null
  })

  const pairRuns = computed(() => chosenRuns.value.filter((r) => r.pairId))
  const combinationOptions = computed(() => {
    const available = new Set(pairRuns.value.flatMap((r) => r.settings.combinations ?? []))
    return COMBINATIONS.filter((c) => available.has(c)).map((c) => ({
      value: c,
      label: COMBINATION_LABELS[c],
    }))
  })

  const body = computed<PreviewComparisonBody | null>(() => {
    if (draft.runIds.length === 0 || draft.dampingRatio === null) return null
    const scaling =
      draft.scalingOn && draft.target && draft.fromS !== null && draft.toS !== null
        ? { fromS: draft.fromS, toS: draft.toS, rule: draft.rule }
        : undefined
    return {
      name: draft.name.trim() || undefined,
      runIds: draft.runIds,
      dampingRatio: draft.dampingRatio,
      meanKind: draft.meanKind,
      ...(pairRuns.value.length > 0 && draft.combination ? { combination: draft.combination } : {}),
      ...(draft.target ? { target: draft.target } : {}),
      ...(scaling ? { scaling } : {}),
    }
  })

  const live = useLivePreview(PREVIEW_DELAY_MS)
  watch(
    body,
    () => {
      if (!ready.value || readOnly.value) return
      live.schedule(async (signal) => {
        const request = body.value
        drawing.value = request ? await comparisonsApi.previewComparison(request, signal) : null
      })
    },
    { deep: true },
  )

  /** What the inputs leave to choose from, and the runs chosen. */
  const choices = reactive({
    runs: runOptions,
    damping: dampingOptions,
    combinations: combinationOptions,
    chosenRuns,
    pairRuns,
  })
  /** The live drawing: null until there is something to draw. */
  const preview = reactive({ drawing, busy: live.busy, problem: live.problem })

  return { draft, preview, choices, fill, body }
}

import { type Ref, computed, onScopeDispose, ref, watch } from 'vue'
import { dampingLabel } from '../../shared/charts/spectrumChart'
import type { ScalingRule } from '../../shared/spectra/suite'
import { COMBINATIONS, COMBINATION_LABELS } from '../../shared/vocabulary/combinations'
import { ApiError } from '@/api/client'
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
import { useErrorReporter } from '@/composables/useErrorReporter'
import { formatDateTime } from '@/formatDateTime'

/** How long the inputs must rest before the preview is asked for again. */
const PREVIEW_DELAY_MS = 350

/** The stored target of a saved comparison, as the target editor takes it. */
function targetInputOf(stored: ComparisonSummary['target']): ComparisonTargetInput | null {
  if (!stored) return null
  return stored.targetId ? { targetId: stored.targetId } : stored.definition
}

/**
 * A comparison being edited, before it is saved: its inputs, the choices they leave open (the
 * damping ratios every chosen run has, the combinations its pairs have), the request body, and
 * the live drawing from POST /api/comparisons/preview, asked for once the inputs rest. The
 * preview waits while `ready` is false (saved inputs still loading) or `locked` is true.
 */
export function useComparisonDraft(options: { runs: Ref<Run[]>; ready: Ref<boolean>; locked: Ref<boolean> }) {
  const { runs, ready, locked } = options
  const { report } = useErrorReporter()

  const name = ref('')
  const runIds = ref<string[]>([])
  const dampingRatio = ref<number | null>(null)
  const meanKind = ref<MeanKind>('arithmetic')
  const combination = ref<Combination | null>(null)
  const target = ref<ComparisonTargetInput | null>(null)
  const scalingOn = ref(false)
  const fromS = ref<number | null>(0.2)
  const toS = ref<number | null>(2)
  const rule = ref<ScalingRule>('suite-90')
  /** The checked comparison this draft revises, if any. */
  const revisionOf = ref<string | null>(null)

  const drawing = ref<ComparisonDrawing | null>(null)
  const previewing = ref(false)
  const previewProblem = ref<string | null>(null)

  /** Puts a saved comparison's inputs in the fields. */
  function fill(c: ComparisonSummary) {
    name.value = c.name
    runIds.value = [...c.runIds]
    dampingRatio.value = c.dampingRatio
    meanKind.value = c.meanKind
    combination.value = c.combination
    target.value = targetInputOf(c.target)
    scalingOn.value = c.scaling !== null
    if (c.scaling) {
      fromS.value = c.scaling.fromS
      toS.value = c.scaling.toS
      rule.value = c.scaling.rule
    }
  }

  const runOptions = computed(() =>
    runs.value
      .filter((r) => r.status === 'succeeded')
      .map((r) => ({
        value: r.id,
        label: `${r.subjectName}${r.pairId ? ' (pair)' : ''} · ${r.settings.dampingRatios.map(dampingLabel).join(', ')} · ${r.createdBy.name}, ${formatDateTime(r.createdAt)}${r.revision > 1 ? ` · rev ${r.revision}` : ''}`,
      })),
  )
  const chosenRuns = computed(() =>
    runIds.value.map((id) => runs.value.find((r) => r.id === id)).filter((r) => r !== undefined),
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
    if (dampingRatio.value !== null && choices.some((o) => o.value === dampingRatio.value)) return
    dampingRatio.value =
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
    if (runIds.value.length === 0 || dampingRatio.value === null) return null
    const scaling =
      scalingOn.value && target.value && fromS.value !== null && toS.value !== null
        ? { fromS: fromS.value, toS: toS.value, rule: rule.value }
        : undefined
    return {
      name: name.value.trim() || undefined,
      runIds: runIds.value,
      dampingRatio: dampingRatio.value,
      meanKind: meanKind.value,
      ...(pairRuns.value.length > 0 && combination.value ? { combination: combination.value } : {}),
      ...(target.value ? { target: target.value } : {}),
      ...(scaling ? { scaling } : {}),
    }
  })

  let timer: ReturnType<typeof setTimeout> | undefined
  let controller: AbortController | undefined
  async function redraw() {
    controller?.abort()
    const request = body.value
    previewProblem.value = null
    if (!request) {
      drawing.value = null
      return
    }
    controller = new AbortController()
    previewing.value = true
    try {
      drawing.value = await comparisonsApi.previewComparison(request, controller.signal)
    } catch (err) {
      if (err instanceof DOMException && err.name === 'AbortError') return
      previewProblem.value = err instanceof ApiError ? err.message : report(err)
    } finally {
      previewing.value = false
    }
  }
  watch(
    body,
    () => {
      if (!ready.value || locked.value) return
      clearTimeout(timer)
      timer = setTimeout(redraw, PREVIEW_DELAY_MS)
    },
    { deep: true },
  )
  onScopeDispose(() => {
    clearTimeout(timer)
    controller?.abort()
  })

  return {
    name,
    runIds,
    dampingRatio,
    meanKind,
    combination,
    target,
    scalingOn,
    fromS,
    toS,
    rule,
    revisionOf,
    drawing,
    previewing,
    previewProblem,
    fill,
    runOptions,
    chosenRuns,
    dampingOptions,
    pairRuns,
    combinationOptions,
    body,
  }
}

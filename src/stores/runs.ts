import { defineStore } from 'pinia'
import { ref } from 'vue'
import { ApiError } from '@/api/client'
import * as creditsApi from '@/api/credits'
import * as runsApi from '@/api/runs'
import type { NewRunInput, Run, SpectrumResult } from '@/api/runs'
import { useErrorReporter } from '@/composables/useErrorReporter'

const isEnd = (run: Pick<Run, 'status'>) => run.status === 'succeeded' || run.status === 'failed'

/**
 * The firm's runs: the list, the run open on its page with its spectrum, the credit balance the
 * new-run form shows, and live progress of unfinished runs through their event streams.
 * Starting a run throws on failure (402, 400) so the form can say so beside its fields.
 */
export const useRunsStore = defineStore('runs', () => {
  const items = ref<Run[]>([])
  const current = ref<Run | null>(null)
  const currentSpectrum = ref<SpectrumResult | null>(null)
  const balance = ref<number | null>(null)
  const loading = ref(false)
  const loadingCurrent = ref(false)
  const creating = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()
  const following = new Map<string, () => void>()

  /** Applies a change to the run wherever the store holds it. */
  function patch(id: string, change: Partial<Run>) {
    items.value = items.value.map((r) => (r.id === id ? { ...r, ...change } : r))
    if (current.value?.id === id) current.value = { ...current.value, ...change }
  }

  async function refreshRun(id: string) {
    const run = await runsApi.getRun(id)
    patch(id, run)
    if (current.value?.id === id && run.status === 'succeeded') {
      currentSpectrum.value = await runsApi.getRunSpectrum(id)
    }
  }

  /** Follows an unfinished run's progress and status live; when it ends, reloads it (and its spectrum). */
  function follow(run: Run) {
    if (isEnd(run) || following.has(run.id)) return
    const stop = runsApi.followRun(run.id, {
      onProgress: ({ progress }) => patch(run.id, { progress }),
      onStatus: ({ status, progress, error: message }) => {
        patch(run.id, { status, progress, error: message })
        if (status === 'succeeded' || status === 'failed') {
          unfollow(run.id)
          refreshRun(run.id).catch((err: unknown) => (error.value = report(err, 'Could not reload the run')))
        }
      },
    })
    following.set(run.id, stop)
  }

  function unfollow(id: string) {
    following.get(id)?.()
    following.delete(id)
  }

  /** Stops every live stream (a view calls this when it closes). */
  function unfollowAll() {
    for (const id of [...following.keys()]) unfollow(id)
  }

  async function load(query: { projectId?: string; recordId?: string } = {}): Promise<void> {
    loading.value = true
    error.value = null
    try {
      items.value = await runsApi.listRuns(query)
      for (const run of items.value) follow(run)
    } catch (err) {
      error.value = report(err, 'Could not load the runs')
    } finally {
      loading.value = false
    }
  }

  /** Opens one run; a succeeded run brings its spectrum, an unfinished one is followed live. */
  async function open(id: string): Promise<void> {
    loadingCurrent.value = true
    error.value = null
    current.value = null
    currentSpectrum.value = null
    try {
      const run = await runsApi.getRun(id)
      current.value = run
      if (run.status === 'succeeded') currentSpectrum.value = await runsApi.getRunSpectrum(id)
      else follow(run)
    } catch (err) {
      error.value = report(err, 'Could not open the run')
    } finally {
      loadingCurrent.value = false
    }
  }

  /** The firm's credit balance, shown beside the cost of a run. */
  async function loadBalance(): Promise<void> {
    try {
      balance.value = (await creditsApi.getCredits()).balance
    } catch (err) {
      error.value = report(err, 'Could not read the credit balance')
    }
  }

  /** Starts a run (one credit); the new run is followed live. Throws ApiError so the form can show it. */
  async function create(input: NewRunInput): Promise<Run> {
    creating.value = true
    error.value = null
    try {
      const run = await runsApi.createRun(input)
      items.value = [run, ...items.value]
      if (balance.value !== null) balance.value -= 1
      follow(run)
      return run
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      if (err instanceof ApiError && err.code === 'no_credits') balance.value = 0
      throw err
    } finally {
      creating.value = false
    }
  }

  return {
    items,
    current,
    currentSpectrum,
    balance,
    loading,
    loadingCurrent,
    creating,
    error,
    load,
    open,
    loadBalance,
    create,
    follow,
    unfollowAll,
  }
})

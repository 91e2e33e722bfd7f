import { defineStore } from 'pinia'
import { ref } from 'vue'
import { ApiError } from '@/api/client'
import * as runsApi from '@/api/runs'
import type { NewRunInput, Run, SpectrumResult } from '@/api/runs'
import { useRequestState } from '@/composables/useRequestState'
import { useCreditsStore } from '@/stores/credits'
import { isFinished } from '../../shared/vocabulary/runStatuses'

/**
 * The firm's runs: the list, the run open on its page with its spectrum, and live progress of
 * unfinished runs through their event streams. Starting a run throws on failure (402, 400) so
 * the form can say so beside its fields; the credit balance it changes lives in the credits store.
 */
export const useRunsStore = defineStore('runs', () => {
  const items = ref<Run[]>([])
  const current = ref<Run | null>(null)
  const currentSpectrum = ref<SpectrumResult | null>(null)
  const loading = ref(false)
  const loadingCurrent = ref(false)
  /** The open run does not exist, or is another firm's. */
  const currentMissing = ref(false)
  const creating = ref(false)
  const { error, report, read, submit } = useRequestState()
  const credits = useCreditsStore()
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
    if (isFinished(run.status) || following.has(run.id)) return
    const stop = runsApi.followRun(run.id, {
      onProgress: ({ progress }) => patch(run.id, { progress }),
      onStatus: ({ status, progress, error: message }) => {
        patch(run.id, { status, progress, error: message })
        if (isFinished(status)) {
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
    await read(loading, 'Could not load the runs', async () => {
      items.value = await runsApi.listRuns(query)
      for (const run of items.value) follow(run)
    })
  }

  /** Opens one run; a succeeded run brings its spectrum, an unfinished one is followed live. */
  async function open(id: string): Promise<void> {
    current.value = null
    currentSpectrum.value = null
    await read(
      loadingCurrent,
      'Could not open the run',
      async () => {
        const run = await runsApi.getRun(id)
        current.value = run
        if (run.status === 'succeeded') currentSpectrum.value = await runsApi.getRunSpectrum(id)
        else follow(run)
      },
      { missing: currentMissing, id },
    )
  }

  /** Starts a run (one credit); the new run is followed live. Throws ApiError so the form can show it. */
  function create(input: NewRunInput): Promise<Run> {
    return submit(creating, async () => {
      try {
        const run = await runsApi.createRun(input)
        items.value = [run, ...items.value]
        credits.noteCharged(run.creditsCharged)
        follow(run)
        return run
      } catch (err) {
        if (err instanceof ApiError && err.code === 'no_credits') credits.noteEmpty()
        throw err
      }
    })
  }

  return {
    items,
    current,
    currentSpectrum,
    loading,
    loadingCurrent,
    currentMissing,
    creating,
    error,
    load,
    open,
    create,
    follow,
    unfollowAll,
  }
})

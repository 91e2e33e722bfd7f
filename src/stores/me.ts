import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import { TRIPARTITE_UNITS } from '../../shared/charts/tripartiteChart'
import type { DisplayUnit } from '../../shared/charts/units'
import * as meApi from '@/api/me'
import type { UnitSystem } from '@/api/me'
import { useErrorReporter } from '@/composables/useErrorReporter'

/**
 * The signed-in member's preferences. Units: SI, or US customary (SD in inches, SV and PSV in
 * in/s, SA and PSA in g). Data stay SI everywhere; pages, tables and charts convert on display.
 */
export const useMeStore = defineStore('me', () => {
  const units = ref<UnitSystem>('si')
  const loaded = ref(false)
  const loading = ref(false)
  const saving = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()

  /** The display units of each kind of motion in the member's system. */
  const displayUnits = computed<{
    acceleration: DisplayUnit
    velocity: DisplayUnit
    displacement: DisplayUnit
  }>(() =>
    units.value === 'us'
      ? { acceleration: 'g', velocity: 'in/s', displacement: 'in' }
      : { acceleration: 'g', velocity: 'cm/s', displacement: 'mm' },
  )
  const tripartiteUnits = computed(() => TRIPARTITE_UNITS[units.value])

  let pending: Promise<void> | null = null
  /** Loads the preferences once; later calls share the answer. */
  function ensureLoaded(): Promise<void> {
    if (loaded.value) return Promise.resolve()
    pending ??= (async () => {
      loading.value = true
      try {
        units.value = (await meApi.getMe()).units
        loaded.value = true
      } catch (err) {
        error.value = report(err, 'Could not load your preferences')
      } finally {
        loading.value = false
        pending = null
      }
    })()
    return pending
  }

  /** Saves the units; an ApiError is thrown on for the form to show. */
  async function setUnits(next: UnitSystem): Promise<void> {
    saving.value = true
    error.value = null
    try {
      units.value = (await meApi.updateMyUnits(next)).units
      loaded.value = true
    } catch (err) {
      error.value = report(err, 'Could not save your units')
      throw err
    } finally {
      saving.value = false
    }
  }

  /** Forgets the member (after signing out). */
  function reset() {
    units.value = 'si'
    loaded.value = false
  }

  return {
    units,
    loaded,
    loading,
    saving,
    error,
    displayUnits,
    tripartiteUnits,
    ensureLoaded,
    setUnits,
    reset,
  }
})

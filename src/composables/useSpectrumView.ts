import { computed, ref } from 'vue'
import {
  type DisplayUnit,
  type MotionKind,
  type SpectrumQuantity,
  spectrumQuantities,
} from '../../shared/charts/units'
import { useMeStore } from '@/stores/me'

/** The two unit choices a spectrum page offers; velocity and displacement follow acceleration's. */
export type UnitSystem = 'practical' | 'SI'

export const UNIT_SYSTEMS: Readonly<Record<UnitSystem, Readonly<Record<MotionKind, DisplayUnit>>>> = {
  practical: { acceleration: 'g', velocity: 'cm/s', displacement: 'mm' },
  SI: { acceleration: 'm/s²', velocity: 'm/s', displacement: 'm' },
}

/** The practical units of a member who chose US customary (Account page): SD in in, SV and PSV in in/s. */
export const US_PRACTICAL: Readonly<Record<MotionKind, DisplayUnit>> = {
  acceleration: 'g',
  velocity: 'in/s',
  displacement: 'in',
}

/** The units of each choice for this member: "practical" follows their SI or US preference. */
export function useUnitSystems() {
  const me = useMeStore()
  void me.ensureLoaded()
  return computed<Readonly<Record<UnitSystem, Readonly<Record<MotionKind, DisplayUnit>>>>>(() => ({
    ...UNIT_SYSTEMS,
    ...(me.units === 'us' ? { practical: US_PRACTICAL } : {}),
  }))
}

/**
 * How a spectrum is being looked at: which quantity, in which units, on which axes. The run
 * page and the overview hold one each and hand it to SpectrumControls; `plotView` is what the
 * chart builders and the exports take.
 */
export function useSpectrumView() {
  const quantity = ref<SpectrumQuantity>('PSA')
  const system = ref<UnitSystem>('practical')
  const logPeriods = ref(true)
  const logOrdinates = ref(false)

  const systems = useUnitSystems()
  const unitOf = (kind: MotionKind): DisplayUnit => systems.value[system.value][kind]
  const unit = computed(() => unitOf(spectrumQuantities[quantity.value].kind))
  const plotView = computed(() => ({
    quantity: quantity.value,
    unit: unit.value,
    xScale: logPeriods.value ? ('log' as const) : ('linear' as const),
    yScale: logOrdinates.value ? ('log' as const) : ('linear' as const),
  }))

  return { quantity, system, logPeriods, logOrdinates, unit, unitOf, plotView }
}

import { computed, ref } from 'vue'
import {
  type DisplayUnit,
  type MotionKind,
  type SpectrumQuantity,
  spectrumQuantities,
} from '../../shared/charts/units'

/** The two unit choices a spectrum page offers; velocity and displacement follow acceleration's. */
export type UnitSystem = 'practical' | 'SI'

export const UNIT_SYSTEMS: Readonly<Record<UnitSystem, Readonly<Record<MotionKind, DisplayUnit>>>> = {
  practical: { acceleration: 'g', velocity: 'cm/s', displacement: 'mm' },
  SI: { acceleration: 'm/s²', velocity: 'm/s', displacement: 'm' },
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

  const unitOf = (kind: MotionKind): DisplayUnit => UNIT_SYSTEMS[system.value][kind]
  const unit = computed(() => unitOf(spectrumQuantities[quantity.value].kind))
  const plotView = computed(() => ({
    quantity: quantity.value,
    unit: unit.value,
    xScale: logPeriods.value ? ('log' as const) : ('linear' as const),
    yScale: logOrdinates.value ? ('log' as const) : ('linear' as const),
  }))

  return { quantity, system, logPeriods, logOrdinates, unit, unitOf, plotView }
}

/**
 * Before/after pins of the engine: the standard record job and a pair job, bit for bit.
 *
 * Each pin is the SHA-256 of the Float64 ordinates of every curve (sdM, svMPerS, saMPerS2,
 * psvMPerS, psaMPerS2, then sdTimeS and saTimeS where given, curve by curve in the engine's
 * order), with the work and one ordinate printed beside it. The values were computed with the
 * code at commit 255106a, before the record and pair paths were merged into one refinement driver.
 * A change that moves any bit of these jobs must update the pin here and say why.
 */
import { createHash } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { computeSpectrum } from './computeSpectrum.js'
import { demoRecord } from './demo/demoRecords.js'
import { parseRecord } from './parseRecord.js'
import { defaultPeriodsS } from './periods.js'
import { computeRotDSpectrum } from './rotd.js'

const SERIES = ['sdM', 'svMPerS', 'saMPerS2', 'psvMPerS', 'psaMPerS2', 'sdTimeS', 'saTimeS'] as const

type Curve = Partial<Record<(typeof SERIES)[number], Float64Array>>

function ordinatesSha256(curves: readonly Curve[]): string {
  const hash = createHash('sha256')
  for (const curve of curves) {
    for (const key of SERIES) {
      const series = curve[key]
      if (series) hash.update(new Uint8Array(series.buffer, series.byteOffset, series.byteLength))
    }
  }
  return hash.digest('hex')
}

const far = parseRecord(demoRecord('synthetic-far-field').text)
const STANDARD_DAMPING = [0.02, 0.05, 0.1, 0.2]

describe('engine pins (code at commit 255106a)', () => {
  it('the standard record job keeps its bits with either kernel', () => {
    expect(far.accelMPerS2.length).toBe(8001)
    for (const kernel of ['wasm-simd', 'js'] as const) {
      const result = computeSpectrum(
        { accelMPerS2: far.accelMPerS2, dtS: far.dtS },
        { dampingRatios: STANDARD_DAMPING, periodsS: defaultPeriodsS(), method: 'newmark-average', kernel },
      )
      const pin = {
        sha256: ordinatesSha256(result.curves),
        oscillatorSteps: result.oscillatorSteps,
        psaAt5PercentPeriod150: result.curves[1]!.psaMPerS2[150],
      }
      console.log(`standard record job (${kernel}):`, pin)
      expect(pin).toEqual({
        sha256: '4ed40e8c5edee33cccc2470b8af88b82b0b28daaeed9c2c538adab09f066014b',
        oscillatorSteps: 128_656_000,
        psaAt5PercentPeriod150: 4.429485955041098,
      })
    }
  })

  it('the pair job keeps its bits', () => {
    const periodsS = defaultPeriodsS().filter((_, index) => index % 10 === 0)
    const result = computeRotDSpectrum(
      {
        accel1MPerS2: far.accelMPerS2,
        accel2MPerS2: Float64Array.from(far.accelMPerS2).reverse(),
        dtS: far.dtS,
      },
      {
        dampingRatios: [0.05],
        periodsS,
        method: 'newmark-average',
        combinations: ['geomean', 'rotd50', 'rotd100'],
      },
    )
    const pin = {
      sha256: ordinatesSha256(result.curves),
      oscillatorSteps: result.oscillatorSteps,
      psaAtPeriod15: result.curves.map((curve) => curve.psaMPerS2[15]),
    }
    console.log('pair job:', pin)
    expect(pin).toEqual({
      sha256: '7ec2f971652f56c408896778dfab7660643b1ca08d71d19b5f28d13d4d20cf56',
      oscillatorSteps: 9_504_000,
      psaAtPeriod15: [4.480101061038749, 4.136089148392139, 4.531294538653593],
    })
  })
})

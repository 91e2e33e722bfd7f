import { describe, expect, it } from 'vitest'
import { spectrumResultSchema } from '../schemas/spectrum.js'
import { computeSpectrum } from './computeSpectrum.js'
import { demoRecord } from './demo/demoRecords.js'
import { parseRecord } from './parseRecord.js'
import { recordParameters } from './recordParameters.js'
import { toSpectrumJson } from './toSpectrumJson.js'
import { warningMessage } from '../warningMessages.js'

describe('toSpectrumJson', () => {
  const parsed = parseRecord(demoRecord('synthetic-near-fault-pulse').text)
  const computation = computeSpectrum(parsed, {
    dampingRatios: [0.02, 0.05],
    periodsS: [0.1, 1, 3],
    method: 'piecewise-exact',
  })
  const json = toSpectrumJson(
    { ...recordParameters(parsed.accelMPerS2, parsed.dtS), sourceUnits: parsed.sourceUnits },
    computation,
    ['a record warning'],
  )

  it('produces the documented shape, which the schema accepts, in SI units with plain arrays', () => {
    const result = spectrumResultSchema.parse(JSON.parse(JSON.stringify(json)))
    expect(result.record.points).toBe(4001)
    expect(result.record.sourceUnits).toBe('g')
    expect(result.method).toBe('piecewise-exact')
    expect(result.periodsS).toEqual([0.1, 1, 3])
    expect(result.curves.map((curve) => curve.dampingRatio)).toEqual([0.02, 0.05])
    expect(result.curves[1]!.psaMPerS2[1]).toBe(computation.curves[1]!.psaMPerS2[1])
    expect(result.warnings[0]).toBe('a record warning')
    expect(result.methodStatement.engineVersion).toBe(computation.methodStatement.engineVersion)
  })

  it('the schema accepts run settings and two-component curves without peak times', () => {
    const [curve] = json.curves
    const withExtras = {
      ...json,
      settings: {
        method: 'piecewise-exact',
        dampingRatios: [0.05],
        periodsS: [0.1, 1, 3],
        periodChoice: 'list',
        periodGrid: null,
      },
      curves: [{ ...curve!, combination: 'rotd50', sdTimeS: undefined, saTimeS: undefined }],
    }
    expect(spectrumResultSchema.safeParse(withExtras).success).toBe(true)
  })

  it('the schema rejects a curve whose length differs from the periods, and negative ordinates', () => {
    const short = { ...json, curves: [{ ...json.curves[0]!, sdM: [1, 2] }] }
    const shortResult = spectrumResultSchema.safeParse(short)
    expect(shortResult.success).toBe(false)
    expect(shortResult.error?.issues[0]?.path).toEqual(['curves', 0, 'sdM'])
    const negative = { ...json, curves: [{ ...json.curves[0]!, psaMPerS2: [-1, 0, 0] }] }
    expect(spectrumResultSchema.safeParse(negative).success).toBe(false)
  })

  it('words the computation warnings from the message table and keeps their codes beside them', () => {
    const short = computeSpectrum(parsed, {
      dampingRatios: [0.05],
      periodsS: [0.001, 1],
      method: 'piecewise-exact',
    })
    const result = toSpectrumJson(
      { ...recordParameters(parsed.accelMPerS2, parsed.dtS), sourceUnits: parsed.sourceUnits },
      short,
      ['a record warning'],
    )
    expect(result.warningCodes).toEqual([
      { code: 'periods-below-two-dt', periods: 1, twoDtS: 2 * parsed.dtS },
    ])
    expect(result.warnings).toEqual(['a record warning', warningMessage(result.warningCodes![0]!)])
    expect(spectrumResultSchema.parse(JSON.parse(JSON.stringify(result))).warningCodes).toEqual(
      result.warningCodes,
    )
  })

  it('gives the curves of a pair their combination and no peak times', () => {
    const pair = computeSpectrum(
      {
        accel1MPerS2: parsed.accelMPerS2,
        accel2MPerS2: parsed.accelMPerS2.map((a) => 0.5 * a),
        dtS: parsed.dtS,
      },
      {
        dampingRatios: [0.05],
        periodsS: [0.5, 2],
        method: 'piecewise-exact',
        combinations: ['geomean', 'rotd100'],
      },
    )
    const result = toSpectrumJson(
      { ...recordParameters(parsed.accelMPerS2, parsed.dtS), sourceUnits: parsed.sourceUnits },
      pair,
    )
    expect(result.curves.map((curve) => curve.combination)).toEqual(['geomean', 'rotd100'])
    expect(result.curves.every((curve) => !('sdTimeS' in curve) && !('saTimeS' in curve))).toBe(true)
    expect(result.methodStatement.combinationRule).toMatch(/RotD/)
    expect(spectrumResultSchema.safeParse(JSON.parse(JSON.stringify(result))).success).toBe(true)
  })
})

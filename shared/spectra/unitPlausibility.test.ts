import { describe, expect, it } from 'vitest'
import { parseRecord } from './parseRecord.js'
import { unitPlausibilityWarnings } from './unitPlausibility.js'
import { STANDARD_GRAVITY_M_PER_S2 } from './units.js'

const G = STANDARD_GRAVITY_M_PER_S2

describe('unitPlausibilityWarnings', () => {
  it('says values given as g look like m/s² when PGA comes out near 10 g', () => {
    // 9.3 "g" is 9.3 m/s² = 0.95 g read as m/s²: the usual slip.
    const [w] = unitPlausibilityWarnings(9.3 * G, 'g', 0.01)
    expect(w).toMatchObject({ code: 'pga-above-plausible', likelyUnits: 'm/s2' })
    expect(w!.message).toBe(
      'PGA is 9.3 g after conversion from g, above 4 g, more than recorded ground motions reach. The values look like m/s², not g (read as m/s², PGA would be 0.948 g). Check the units.',
    )
  })

  it('says values given as g look like cm/s² (gal) when PGA comes out in the hundreds of g', () => {
    // Above the 20 g refusal in parseRecord, but the hint itself is plain arithmetic: 350 gal = 0.357 g.
    const [w] = unitPlausibilityWarnings(350 * G, 'g', 0.01)
    expect(w).toMatchObject({ code: 'pga-above-plausible', likelyUnits: 'cm/s2' })
  })

  it('says values given as cm/s² look like g when PGA comes out below 0.0005 g', () => {
    // 0.35 "cm/s²" = 0.000357 g; read as g it is 0.35 g.
    const [w] = unitPlausibilityWarnings(0.35 * 0.01, 'cm/s2', 0.01)
    expect(w).toMatchObject({ code: 'pga-below-plausible', likelyUnits: 'g' })
    expect(w!.message).toMatch(/below 0\.0005 g.*look like g, not cm\/s²/)
  })

  it('is silent from 0.0005 g to 4 g and for Δt up to 0.1 s', () => {
    expect(unitPlausibilityWarnings(4 * G, 'g', 0.1)).toEqual([])
    expect(unitPlausibilityWarnings(0.0005 * G, 'm/s2', 0.005)).toEqual([])
  })

  it('warns on a time step above 0.1 s, naming milliseconds when that fits', () => {
    const [ms] = unitPlausibilityWarnings(G, 'g', 5)
    expect(ms).toMatchObject({ code: 'dt-above-plausible' })
    expect(ms!.message).toMatch(/It looks like milliseconds: 5 ms would be Δt = 0\.005 s\./)
    const [coarse] = unitPlausibilityWarnings(G, 'g', 0.2)
    expect(coarse!.message).toMatch(/Check that the time step is in seconds and is not the sampling rate\./)
  })
})

const values = (n: number, amplitude: number) =>
  Array.from({ length: n }, (_, i) => (amplitude * Math.sin(i / 3)).toFixed(5)).join('\n')
const timeValue = (header: string, n = 40) =>
  `${header}\n` +
  Array.from({ length: n }, (_, i) => `${(i * 0.01).toFixed(2)},${(0.3 * Math.sin(i / 3)).toFixed(5)}`).join(
    '\n',
  )

describe('parseRecord units and time steps', () => {
  for (const [header, units] of [
    ['time_s,accel_m_s2', 'm/s2'],
    ['t (s),acc (g)', 'g'],
    ['t [s],a [cm/s2]', 'cm/s2'],
    ['time,in/s^2', 'in/s2'],
    ['t,a_cm_per_s2', 'cm/s2'],
  ] as const) {
    it(`reads ${units} from the column header "${header}"`, () => {
      expect(parseRecord(timeValue(header)).sourceUnits).toBe(units)
    })
  }

  it('reads a decimal comma in a header time step ("dt = 0,005 s") as 0.005 s', () => {
    expect(parseRecord(`dt = 0,005 s\n${values(40, 0.2)}`, { units: 'g' }).dtS).toBe(0.005)
  })

  it('keeps the record but warns when the values look like the wrong units', () => {
    const parsed = parseRecord(values(40, 9.3), { units: 'g', dtS: 0.01 })
    expect(parsed.points).toBe(40)
    expect(parsed.warnings.some((w) => w.includes('look like m/s², not g'))).toBe(true)
  })
})

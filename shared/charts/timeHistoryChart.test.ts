import { Resvg } from '@resvg/resvg-js'
import { describe, expect, it } from 'vitest'
import { buildTimeHistoryChart, thinForDrawing, timeHistoryChartSvg } from './timeHistoryChart.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'

const dtS = 0.01
const n = 2001
const acceleration = Array.from(
  { length: n },
  (_, i) => 0.5 * STANDARD_GRAVITY_M_PER_S2 * Math.sin(2 * Math.PI * i * dtS) * Math.exp(-i / 800),
)
const velocity = acceleration.map((v) => v * 0.01)
const displacement = acceleration.map((v) => v * 0.001)

describe('thinForDrawing', () => {
  it('keeps every sample when they fit the pixel columns', () => {
    expect(thinForDrawing([1, 2, 3, 4], 0, 3, 10)).toEqual([0, 1, 2, 3])
  })

  it('keeps the extremes of each column when thinning, in time order', () => {
    const values = Array.from({ length: 1000 }, (_, i) => (i === 537 ? 9 : i === 212 ? -9 : Math.sin(i)))
    const kept = thinForDrawing(values, 0, 999, 50)
    expect(kept.length).toBeLessThan(200)
    expect(kept).toContain(537)
    expect(kept).toContain(212)
    expect(kept).toEqual([...kept].sort((a, b) => a - b))
    expect(kept[kept.length - 1]).toBe(999)
  })
})

describe('timeHistoryChartSvg', () => {
  it('draws three panels with units and peaks, deterministically', () => {
    const data = {
      dtS,
      accelerationMPerS2: acceleration,
      velocityMPerS: velocity,
      displacementM: displacement,
    }
    const svg = timeHistoryChartSvg(data, { displacementUnit: 'mm', title: 'Record <1>' })
    expect(svg).toBe(timeHistoryChartSvg(data, { displacementUnit: 'mm', title: 'Record <1>' }))
    expect(svg).toContain('Acceleration (g)')
    expect(svg).toContain('Velocity (m/s)')
    expect(svg).toContain('Displacement (mm)')
    expect(svg).toContain('Time t (s)')
    expect(svg).toContain('Record &lt;1&gt;')
    expect(svg).toMatch(/peak 0\.4\d+ g at 0\.2\d? s/)
    expect(svg).not.toMatch(/NaN|undefined/)
    expect(new Resvg(svg).render().height).toBeGreaterThan(300)
  })

  it('zooms to a window inside the record and clamps one that runs past it', () => {
    const data = { dtS, accelerationMPerS2: acceleration }
    expect(buildTimeHistoryChart(data, { timeDomainS: [2, 5] }).frame.timeDomainS).toEqual([2, 5])
    const clamped = buildTimeHistoryChart(data, { timeDomainS: [-3, 99] }).frame
    expect(clamped.timeDomainS[0]).toBe(0)
    expect(clamped.timeDomainS[1]).toBeCloseTo(20, 9)
  })

  it('rejects a non-positive time step and series of different lengths', () => {
    expect(() => timeHistoryChartSvg({ dtS: 0, accelerationMPerS2: acceleration })).toThrow(RangeError)
    expect(() =>
      timeHistoryChartSvg({ dtS, accelerationMPerS2: acceleration, velocityMPerS: [1, 2] }),
    ).toThrow(/velocity has 2 samples/)
    expect(() =>
      timeHistoryChartSvg({ dtS, accelerationMPerS2: acceleration }, { accelerationUnit: 'mm' }),
    ).toThrow(RangeError)
  })
})

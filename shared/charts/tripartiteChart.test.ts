import { Resvg } from '@resvg/resvg-js'
import { describe, expect, it } from 'vitest'
import { type TripartiteDiagonal, TRIPARTITE_UNITS, buildTripartiteChart } from './tripartiteChart.js'
import { METRES_PER_INCH, STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'

/**
 * Points chosen to sit on a labelled SD diagonal and a labelled PSA diagonal at once:
 * PSA = (2π/T)²·SD, so T = 2π·√(SD/PSA) (pseudo-spectral relations, Chopra, Dynamics of
 * Structures, §6.6).
 */
const g = STANDARD_GRAVITY_M_PER_S2
const POINTS = [
  { sdCm: 1, psaG: 1 },
  { sdCm: 10, psaG: 0.1 },
  { sdCm: 0.1, psaG: 1 },
  { sdCm: 10, psaG: 1 },
]
  .map(({ sdCm, psaG }) => {
    const sdM = sdCm / 100
    const psaMPerS2 = psaG * g
    const periodS = 2 * Math.PI * Math.sqrt(sdM / psaMPerS2)
    return { sdCm, psaG, periodS, psvMPerS: (2 * Math.PI * sdM) / periodS }
  })
  .sort((a, b) => a.periodS - b.periodS)

function chartOfPoints() {
  return buildTripartiteChart(
    {
      series: [
        {
          label: 'Check points',
          periodsS: POINTS.map((p) => p.periodS),
          values: POINTS.map((p) => p.psvMPerS),
          role: 'record',
        },
      ],
    },
    { quantity: 'PSV', id: 'geom', xDomainS: [0.01, 10] },
  )
}

/** The vertices of the first curve path drawn after the diagonal group, in SVG pixels. */
function curvePoints(svg: string): Array<[number, number]> {
  const curve = [...svg.matchAll(/<path d="([^"]+)" fill="none"/g)][0]?.[1] ?? ''
  return [...curve.matchAll(/[ML]([-\d.]+),([-\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])])
}

/** The endpoints of the diagonal with this data-diagonal name, read from the SVG text. */
function diagonalInSvg(svg: string, name: string): TripartiteDiagonal | null {
  const m = new RegExp(
    `<line x1="([-\\d.]+)" y1="([-\\d.]+)" x2="([-\\d.]+)" y2="([-\\d.]+)"[^>]*data-diagonal="${name}"`,
  ).exec(svg)
  if (!m) return null
  const [x1, y1, x2, y2] = m.slice(1, 5).map(Number) as [number, number, number, number]
  return { quantity: 'SD', value: 0, labelled: true, x1, y1, x2, y2 }
}

/** Distance in pixels from a point to the infinite line through a diagonal's endpoints. */
function distanceToLine([px, py]: [number, number], d: TripartiteDiagonal): number {
  const dx = d.x2 - d.x1
  const dy = d.y2 - d.y1
  return Math.abs(dy * px - dx * py + d.x2 * d.y1 - d.y2 * d.x1) / Math.hypot(dx, dy)
}

describe('buildTripartiteChart', () => {
  it('puts each point (T, PSV) on the SD and PSA diagonals of its own values, read back from the SVG', () => {
    const { svg, frame } = chartOfPoints()
    const drawn = curvePoints(svg)
    expect(drawn).toHaveLength(POINTS.length)
    POINTS.forEach((p, i) => {
      const at = drawn[i] as [number, number]
      // Back from pixels to (T, PSV) with the frame's log scales.
      const fx = (at[0] - frame.plot.left) / frame.plot.width
      const fy = (frame.plot.top + frame.plot.height - at[1]) / frame.plot.height
      const [t0, t1] = frame.xDomainS.map(Math.log10) as [number, number]
      const [y0, y1] = frame.yDomain.map(Math.log10) as [number, number]
      const periodS = 10 ** (t0 + fx * (t1 - t0))
      const psvCmPerS = 10 ** (y0 + fy * (y1 - y0))
      // 0.01 px of rounding over a ~600 px plot spanning 3 decades: about 1e-4 relative.
      expect(periodS / p.periodS).toBeCloseTo(1, 3)
      expect(psvCmPerS / (p.psvMPerS * 100)).toBeCloseTo(1, 3)

      const sd = diagonalInSvg(svg, `SD ${p.sdCm}`)
      const psa = diagonalInSvg(svg, `PSA ${p.psaG}`)
      expect(sd, `SD ${p.sdCm} cm diagonal`).not.toBeNull()
      expect(psa, `PSA ${p.psaG} g diagonal`).not.toBeNull()
      expect(distanceToLine(at, sd as TripartiteDiagonal)).toBeLessThan(0.05)
      expect(distanceToLine(at, psa as TripartiteDiagonal)).toBeLessThan(0.05)
    })
  })

  it('keeps a point off the diagonals of other values', () => {
    const { svg } = chartOfPoints()
    const first = curvePoints(svg)[0] as [number, number]
    const other = POINTS.find((p) => p.sdCm !== POINTS[0]?.sdCm)
    const sd = diagonalInSvg(svg, `SD ${other?.sdCm}`) as TripartiteDiagonal
    expect(distanceToLine(first, sd)).toBeGreaterThan(20)
  })

  it('draws SD diagonals with slope −1 and PSA diagonals with slope +1 in log-log', () => {
    const { diagonals, frame } = chartOfPoints()
    const pxPerDecadeX = frame.plot.width / Math.log10(frame.xDomainS[1] / frame.xDomainS[0])
    const pxPerDecadeY = frame.plot.height / Math.log10(frame.yDomain[1] / frame.yDomain[0])
    for (const d of diagonals) {
      const logSlope = -(d.y2 - d.y1) / pxPerDecadeY / ((d.x2 - d.x1) / pxPerDecadeX)
      expect(logSlope).toBeCloseTo(d.quantity === 'SD' ? -1 : 1, 6)
    }
    expect(diagonals.some((d) => d.quantity === 'SD' && d.labelled)).toBe(true)
    expect(diagonals.some((d) => d.quantity === 'PSA' && d.labelled)).toBe(true)
  })

  it('converts PSA input to PSV = PSA·T/2π, landing on the same pixels as PSV input', () => {
    const psa = buildTripartiteChart(
      {
        series: [
          {
            label: 'Check points',
            periodsS: POINTS.map((p) => p.periodS),
            values: POINTS.map((p) => p.psaG * g),
            role: 'record',
          },
        ],
      },
      { quantity: 'PSA', id: 'geom', xDomainS: [0.01, 10] },
    )
    expect(curvePoints(psa.svg)).toEqual(curvePoints(chartOfPoints().svg))
  })

  it('labels the scales in the units asked for: US customary in/s, in and g', () => {
    const { svg, diagonals, frame } = buildTripartiteChart(
      {
        series: [
          {
            label: 'Check points',
            periodsS: POINTS.map((p) => p.periodS),
            values: POINTS.map((p) => p.psvMPerS),
            role: 'record',
          },
        ],
      },
      { quantity: 'PSV', units: TRIPARTITE_UNITS.us },
    )
    expect(svg).toContain('PSV (in/s)')
    expect(svg).toContain('SD (in)')
    expect(svg).toContain('PSA (g)')
    // The SD = 1 in diagonal passes through T = 1 s, PSV = 2π in/s (PSV = 2π·SD/T).
    const oneInch = diagonals.find((d) => d.quantity === 'SD' && d.value === 1) as TripartiteDiagonal
    expect(oneInch).toBeDefined()
    const log = (v: number, [a, b]: [number, number]) => Math.log10(v / a) / Math.log10(b / a)
    const at: [number, number] = [
      frame.plot.left + log(1, frame.xDomainS) * frame.plot.width,
      frame.plot.top + (1 - log(2 * Math.PI, frame.yDomain)) * frame.plot.height,
    ]
    expect(distanceToLine(at, oneInch)).toBeLessThan(0.05)
    // And it is not the SI diagonal: 1 in is 2.54 cm (international inch, 0.0254 m exactly).
    expect(METRES_PER_INCH).toBe(0.0254)
  })

  it('refuses SA, which is not a pseudo-quantity', () => {
    expect(() => buildTripartiteChart({ series: [] }, { quantity: 'SA' as 'PSA' | 'SA' })).toThrow(RangeError)
  })

  it('is well-formed SVG that a strict renderer accepts, without NaN', () => {
    const { svg } = chartOfPoints()
    expect(svg).not.toMatch(/NaN|undefined|Infinity/)
    expect(new Resvg(svg).render().width).toBe(720)
  })
})

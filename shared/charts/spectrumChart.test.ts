import { Resvg } from '@resvg/resvg-js'
import { describe, expect, it } from 'vitest'
import { buildSpectrumChart, spectrumChartSvg, type SpectrumChartData } from './spectrumChart.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'

const periodsS = Array.from({ length: 31 }, (_, i) => 0.01 * 10 ** (i / 10))
const recordPsa = periodsS.map(
  (t) => STANDARD_GRAVITY_M_PER_S2 * (0.3 + 0.4 / (1 + (Math.log10(t / 0.3) * 2) ** 2)),
)

function demoData(label = 'Synthetic record A'): SpectrumChartData {
  return {
    series: [
      { label, periodsS, values: recordPsa, role: 'record', dampingRatio: 0.05 },
      { label: 'Target', periodsS, values: recordPsa.map((v) => v * 1.1), role: 'target' },
      { label: '90% of target', periodsS, values: recordPsa.map((v) => v * 0.99), role: 'target90' },
    ],
    band: {
      label: 'mean ± σ',
      periodsS,
      lower: recordPsa.map((v) => v * 0.8),
      upper: recordPsa.map((v) => v * 1.2),
    },
  }
}

/** x coordinates of the points of the n-th <path d="…"> in the markup. */
function pathPoints(svg: string, n: number): [number, number][] {
  const d = [...svg.matchAll(/<path d="([^"]+)"/g)][n]?.[1] ?? ''
  return [...d.matchAll(/[ML]([-\d.]+),([-\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])])
}

describe('spectrumChartSvg', () => {
  it('gives identical bytes for identical input', () => {
    const a = spectrumChartSvg(demoData(), { quantity: 'PSA', title: 'PSA', note: 'note', id: 'x' })
    const b = spectrumChartSvg(demoData(), { quantity: 'PSA', title: 'PSA', note: 'note', id: 'x' })
    expect(a).toBe(b)
    expect(a).not.toMatch(/NaN|undefined|Infinity/)
  })

  it('is well-formed SVG that a strict renderer accepts', () => {
    const svg = spectrumChartSvg(demoData('A & B <i>"quoted"</i>'), {
      quantity: 'PSA',
      title: "O'Neil <site>",
    })
    const png = new Resvg(svg).render()
    expect(png.width).toBe(720)
  })

  it('escapes record names, titles and notes so they cannot inject markup', () => {
    const svg = spectrumChartSvg(demoData('<script>alert("x")</script> & Co'), {
      quantity: 'PSA',
      title: '<img src=x onerror=alert(1)>',
      note: 'a "note" & more',
    })
    expect(svg).not.toContain('<script')
    expect(svg).not.toContain('<img')
    expect(svg).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; Co')
    expect(svg).toContain('&lt;img src=x onerror=alert(1)&gt;')
    expect(svg).toContain('a &quot;note&quot; &amp; more')
  })

  it('names the quantity and its unit on the ordinate axis', () => {
    expect(spectrumChartSvg(demoData(), { quantity: 'PSA' })).toContain(
      'Pseudo-spectral acceleration, PSA (g)',
    )
    expect(spectrumChartSvg(demoData(), { quantity: 'SA', unit: 'm/s²' })).toContain('SA (m/s²)')
    expect(spectrumChartSvg(demoData(), { quantity: 'SD', unit: 'mm' })).toContain(
      'Spectral displacement, SD (mm)',
    )
    expect(spectrumChartSvg(demoData(), { quantity: 'PSV' })).toContain('PSV (m/s)')
    expect(spectrumChartSvg(demoData(), { quantity: 'PSA' })).toContain('Period T (s)')
  })

  it('converts SI ordinates into the display unit (g = 9.80665 m/s², standard gravity)', () => {
    const flat: SpectrumChartData = {
      series: [
        {
          label: 'flat',
          periodsS: [0.1, 1],
          values: [STANDARD_GRAVITY_M_PER_S2, STANDARD_GRAVITY_M_PER_S2],
          role: 'record',
        },
      ],
    }
    expect(buildSpectrumChart(flat, { quantity: 'PSA' }).frame.yDomain).toEqual([0, 1])
    expect(buildSpectrumChart(flat, { quantity: 'PSA', unit: 'm/s²' }).frame.yDomain).toEqual([0, 10])
    const sd: SpectrumChartData = {
      series: [{ label: 'sd', periodsS: [0.1, 1], values: [0.004, 0.02], role: 'record' }],
    }
    expect(buildSpectrumChart(sd, { quantity: 'SD', unit: 'mm' }).frame.yDomain).toEqual([0, 20])
  })

  it('refuses a unit that does not measure the quantity', () => {
    expect(() => spectrumChartSvg(demoData(), { quantity: 'SD', unit: 'g' })).toThrow(RangeError)
    expect(() => spectrumChartSvg(demoData(), { quantity: 'PSA', unit: 'm/s' })).toThrow(RangeError)
  })

  it('refuses a series whose periods and values differ in length', () => {
    const bad: SpectrumChartData = {
      series: [{ label: 'short', periodsS: [0.1, 1], values: [1], role: 'record' }],
    }
    expect(() => spectrumChartSvg(bad, { quantity: 'PSA' })).toThrow(/short.*2 periods but 1 values/)
  })

  it('places periods on a log axis by decade: 1 s two thirds of the way across 0.01–10 s', () => {
    const data: SpectrumChartData = {
      series: [{ label: 'r', periodsS: [0.01, 1, 10], values: [1, 1, 1], role: 'record' }],
    }
    const { svg, frame } = buildSpectrumChart(data, { quantity: 'PSA', xDomainS: [0.01, 10] })
    const xs = pathPoints(svg, 0).map((p) => p[0])
    const { left, width } = frame.plot
    expect(xs[0]).toBeCloseTo(left, 2)
    expect(xs[1]).toBeCloseTo(left + (2 / 3) * width, 1)
    expect(xs[2]).toBeCloseTo(left + width, 2)
  })

  it('labels the log period axis at 0.01, 0.1, 1 and 10 s', () => {
    const svg = spectrumChartSvg(demoData(), { quantity: 'PSA' })
    for (const label of ['0.01', '0.1', '1', '10']) expect(svg).toContain(`>${label}</text>`)
  })

  it('breaks a curve where a log ordinate axis cannot show a value', () => {
    const data: SpectrumChartData = {
      series: [{ label: 'r', periodsS: [0.1, 0.2, 0.3, 0.4], values: [1, 0, 2, 3], role: 'record' }],
    }
    const svg = spectrumChartSvg(data, { quantity: 'PSA', unit: 'm/s²', yScale: 'log' })
    const d = /<path d="([^"]+)"/.exec(svg)?.[1] ?? ''
    expect(d.match(/M/g)).toHaveLength(2)
  })

  it('names record, damping and target in the legend and draws the band and period range', () => {
    const svg = spectrumChartSvg(demoData(), {
      quantity: 'PSA',
      periodRange: { minS: 0.2, maxS: 2, label: '0.2T1–2T1' },
      note: 'EN 1998-1 spectrum defined to 4 s',
    })
    expect(svg).toContain('Synthetic record A, ζ = 5%')
    expect(svg).toContain('>Target</text>')
    expect(svg).toContain('>mean ± σ</text>')
    expect(svg).toContain('fill-opacity="0.12"')
    expect(svg).toContain('>0.2T1–2T1</text>')
    expect(svg).toContain('EN 1998-1 spectrum defined to 4 s')
    // The period range: a tinted background band with a thin line at each end.
    expect(svg.match(/data-role="period-range"/g)).toHaveLength(1)
    expect(svg).toContain('stroke-dasharray="7 4"')
  })

  it('grows the figure for a long legend rather than squeeze the plot below half of it', () => {
    const series = Array.from({ length: 12 }, (_, i) => ({
      label: `Synthetic record ${i + 1} of the Tidewater Library Annex suite, component H${(i % 2) + 1}`,
      periodsS,
      values: recordPsa,
      role: 'record' as const,
      dampingRatio: 0.05,
    }))
    const { svg, frame } = buildSpectrumChart({ series }, { quantity: 'PSA', widthPx: 560, heightPx: 342 })
    expect(frame.heightPx).toBeGreaterThan(342)
    expect(frame.plot.height).toBeGreaterThanOrEqual(342 / 2 - 14)
    expect(svg).toContain(`viewBox="0 0 560 ${frame.heightPx}"`)
    const lastY = Math.max(...[...svg.matchAll(/<text x="[\d.]+" y="([\d.]+)"/g)].map((m) => Number(m[1])))
    expect(lastY).toBeLessThan(frame.heightPx)
    expect(svg).toContain('component H2, ζ = 5%')
  })

  it('keeps the asked-for height when the legend fits', () => {
    expect(buildSpectrumChart(demoData(), { quantity: 'PSA' }).frame.heightPx).toBe(440)
  })

  it('prints damping ratios without binary noise', () => {
    const data: SpectrumChartData = {
      series: [{ label: 'r', periodsS: [0.1, 1], values: [1, 1], role: 'record', dampingRatio: 0.07 }],
    }
    expect(spectrumChartSvg(data, { quantity: 'PSA' })).toContain('r, ζ = 7%')
  })

  it('keeps ids to safe characters so url(#…) references cannot break out', () => {
    const svg = spectrumChartSvg(demoData(), { quantity: 'PSA', id: 'a"b)<c' })
    expect(svg).toContain('id="a-b--c-clip"')
    expect(svg).toContain('url(#a-b--c-clip)')
  })

  it('describes the chart in text for screen readers', () => {
    const svg = spectrumChartSvg(demoData(), { quantity: 'PSA', title: 'Demo' })
    expect(svg).toMatch(/role="img" aria-labelledby="ordinate-spectrum-title ordinate-spectrum-desc"/)
    expect(svg).toContain(
      '<desc id="ordinate-spectrum-desc">Pseudo-spectral acceleration, PSA (g) against period T (s)',
    )
    expect(svg).toContain('Curves: Synthetic record A (ζ = 5%); Target; 90% of target.')
  })
})

import { describe, expect, it } from 'vitest'
import type { SpectrumChartInput } from '../../shared/schemas/sheets.js'
import { estimateTextWidthPx } from '../../shared/charts/legendLayout.js'
import { exportResvg, pngWidthPx, printChartSvg, printLayout, renderChartPng } from './chartPng.js'

const periodsS = Array.from({ length: 61 }, (_, i) => 10 ** (-2 + i / 20))
const chart: SpectrumChartInput = {
  data: {
    series: [
      {
        label: 'Synthetic test curve',
        periodsS,
        values: periodsS.map((t) => 9.81 / (1 + t)),
        role: 'record',
        dampingRatio: 0.05,
      },
    ],
  },
  options: { quantity: 'PSA', unit: 'g' },
}

function pngInfo(png: Buffer) {
  const phys = png.indexOf('pHYs', 0, 'latin1')
  return {
    signature: png.subarray(1, 4).toString('latin1'),
    width: png.readUInt32BE(16),
    height: png.readUInt32BE(20),
    pixelsPerMetre: phys > 0 ? png.readUInt32BE(phys + 4) : null,
  }
}

describe('pngWidthPx', () => {
  it('is 300 pixels per inch of printed width', () => {
    expect(pngWidthPx(25.4)).toBe(300)
    expect(pngWidthPx(170)).toBe(2008)
    expect(pngWidthPx(84)).toBe(992)
  })
})

describe('printLayout', () => {
  it('lays the chart out at the printed width in CSS pixels (96 per inch)', () => {
    expect(printLayout(254)).toEqual({ widthPx: 960, heightPx: 587 })
  })

  it('keeps a narrow figure at the smallest layout the chart reads well at', () => {
    expect(printLayout(60).widthPx).toBe(560)
  })
})

describe('renderChartPng', () => {
  it.each([60, 120, 170, 400])('is 300 dpi × %i mm wide, in the chart’s proportions', (widthMm) => {
    const info = pngInfo(renderChartPng(chart, widthMm))
    expect(info.signature).toBe('PNG')
    expect(info.width).toBe(pngWidthPx(widthMm))
    const { widthPx, heightPx } = printLayout(widthMm)
    expect(Math.abs(info.height - (info.width * heightPx) / widthPx)).toBeLessThanOrEqual(1)
    // 300 dpi = 300 / 0.0254 m = 11811 pixels per metre.
    expect(info.pixelsPerMetre).toBe(11811)
  })

  it('draws the curve and its text: the image is not blank', () => {
    const png = renderChartPng(chart, 100)
    const blank = renderChartPng({ ...chart, data: { series: [] } }, 100)
    expect(png.length).toBeGreaterThan(blank.length)
  })
})

/** The width of `text` as resvg draws it in the export font at `fontSizePx`, in px. */
function drawnWidthPx(text: string, fontSizePx: number): number {
  const escaped = text.replace(/&/g, '&amp;').replace(/</g, '&lt;')
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="2000" height="40"><text x="0" y="24" font-size="${fontSizePx}">${escaped}</text></svg>`
  return exportResvg(svg, undefined).getBBox()?.width ?? 0
}

/** The legend's text lines: (x, text) of every <text> below the plot frame. */
function legendTexts(svg: string): { x: number; y: number; font: number; text: string }[] {
  const frameBottom = Math.max(
    ...[...svg.matchAll(/<rect x="[^"]+" y="([\d.]+)" width="[^"]+" height="([\d.]+)" fill="none"/g)].map(
      (m) => Number(m[1]) + Number(m[2]),
    ),
  )
  return [...svg.matchAll(/<text x="([\d.]+)" y="([\d.]+)"([^>]*)>([^<]*)<\/text>/g)]
    .map((m) => ({
      x: Number(m[1]),
      y: Number(m[2]),
      font: Number(/font-size="([\d.]+)"/.exec(m[3] ?? '')?.[1] ?? 12),
      text: (m[4] ?? '').replace(/&amp;/g, '&').replace(/&lt;/g, '<'),
    }))
    .filter((t) => t.y > frameBottom + 40)
}

describe('the legend of an exported plot', () => {
  const samples = [
    'Synthetic record A, ζ = 5%',
    'ASCE 7-16 two-period design spectrum, SDS = 1.000 g, SD1 = 0.600 g, TL = 8 s',
    'MMMM WWWW mmmm wwww %%%% @@@@',
    'iiii llll tttt ffff rrrr ....',
    'Halvorsen Kade Structural, Tidewater Library Annex, H1 × 1.537',
  ]
  it.each(samples)(
    'estimates "%s" no narrower, and at most 30% wider, than the export font draws it',
    (text) => {
      const drawn = drawnWidthPx(text, 12)
      expect(drawn).toBeGreaterThan(text.length * 2)
      expect(estimateTextWidthPx(text, 12)).toBeGreaterThanOrEqual(drawn)
      expect(estimateTextWidthPx(text, 12)).toBeLessThanOrEqual(1.3 * drawn)
    },
  )

  it('keeps a long record name and its damping value inside a narrow figure, on more lines', () => {
    const long = {
      ...chart,
      data: {
        series: [
          {
            ...chart.data.series[0]!,
            label: 'Synthetic record of the Tidewater Library Annex site, component H1, baseline as received',
          },
          { ...chart.data.series[0]!, label: 'Second synthetic record, component H2', dampingRatio: 0.1 },
        ],
      },
    }
    const widthMm = 84
    const { widthPx } = printLayout(widthMm)
    const lines = legendTexts(printChartSvg(long, widthMm))
    expect(lines.map((l) => l.text).join(' ')).toContain('baseline as received, ζ = 5%')
    expect(lines.map((l) => l.text).join(' ')).toContain('component H2, ζ = 10%')
    expect(lines.some((l) => l.text.includes('…'))).toBe(false)
    for (const l of lines) expect(l.x + drawnWidthPx(l.text, l.font)).toBeLessThanOrEqual(widthPx)
  })
})

import { describe, expect, it } from 'vitest'
import type { SpectrumChartInput } from '../../shared/schemas/sheets.js'
import { pngWidthPx, printLayout, renderChartPng } from './chartPng.js'

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

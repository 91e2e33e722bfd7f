/**
 * The spectrum plot as a PNG at 300 dpi, for reports that take raster figures. The chart
 * is laid out at the printed width (CSS pixels at 96 per inch, so its 12 px text prints at
 * 9 pt) from the same shared chart function as the screen, then rasterised by resvg with
 * the merged Source Sans 3 TTF, and tagged 300 dpi so a word processor places it at size.
 */
import { crc32 } from 'node:zlib'
import { Resvg } from '@resvg/resvg-js'
import { chartSvg } from '../../shared/charts/chartSvg.js'
import type { SpectrumChartInput } from '../../shared/schemas/sheets.js'
import { EXPORT_FONT_FAMILY, exportFontFiles, printableDeep } from './exportFonts.js'

export const PNG_DPI = 300
const CSS_PX_PER_INCH = 96
const MM_PER_INCH = 25.4
/** Height over width of the exported plot: the proportions of the on-screen chart (720 × 440). */
const ASPECT = 440 / 720

/** The PNG's width in pixels for a printed width: 300 dpi × width. */
export function pngWidthPx(widthMm: number): number {
  return Math.round((widthMm / MM_PER_INCH) * PNG_DPI)
}

/**
 * Narrower than this, the chart's fixed margins and legend leave too little plot for its
 * axis titles, so a narrow figure is this layout scaled down (smaller text) instead.
 */
const MIN_LAYOUT_WIDTH_PX = 560

/** The chart laid out at the printed width, in CSS pixels. */
export function printLayout(widthMm: number): { widthPx: number; heightPx: number } {
  const widthPx = Math.max(MIN_LAYOUT_WIDTH_PX, Math.round((widthMm / MM_PER_INCH) * CSS_PX_PER_INCH))
  return { widthPx, heightPx: Math.round(widthPx * ASPECT) }
}

/** Adds a pHYs chunk (PNG spec §11.3.5.3: pixels per metre, unit 1) right after IHDR. */
function withDensity(png: Buffer, dpi: number): Buffer {
  const signatureAndIhdr = 8 + 8 + 13 + 4
  if (png.toString('latin1', 12, 16) !== 'IHDR') throw new Error('resvg returned a PNG without IHDR first')
  const pixelsPerMetre = Math.round(dpi / 0.0254)
  const data = Buffer.alloc(9)
  data.writeUInt32BE(pixelsPerMetre, 0)
  data.writeUInt32BE(pixelsPerMetre, 4)
  data.writeUInt8(1, 8)
  const typeAndData = Buffer.concat([Buffer.from('pHYs', 'latin1'), data])
  const chunk = Buffer.alloc(4 + typeAndData.length + 4)
  chunk.writeUInt32BE(data.length, 0)
  typeAndData.copy(chunk, 4)
  chunk.writeUInt32BE(crc32(typeAndData), 4 + typeAndData.length)
  return Buffer.concat([png.subarray(0, signatureAndIhdr), chunk, png.subarray(signatureAndIhdr)])
}

/** The SVG the PNG is drawn from: the chart laid out at `widthMm` printed width. */
export function printChartSvg(chart: SpectrumChartInput, widthMm: number): string {
  const printable = printableDeep(chart)
  return chartSvg({ data: printable.data, options: { ...printable.options, ...printLayout(widthMm) } })
}

/** resvg with the export fonts and nothing from the system, so every machine draws alike. */
export function exportResvg(svg: string, fitTo: { mode: 'width'; value: number } | undefined): Resvg {
  const fonts = exportFontFiles()
  return new Resvg(svg, {
    font: {
      loadSystemFonts: false,
      fontFiles: [fonts.regular, fonts.semibold],
      defaultFontFamily: EXPORT_FONT_FAMILY,
      sansSerifFamily: EXPORT_FONT_FAMILY,
    },
    ...(fitTo ? { fitTo } : {}),
    background: '#ffffff',
    logLevel: 'off',
  })
}

/** The plot at `widthMm` printed width, 300 dpi. */
export function renderChartPng(chart: SpectrumChartInput, widthMm: number): Buffer {
  const resvg = exportResvg(printChartSvg(chart, widthMm), { mode: 'width', value: pngWidthPx(widthMm) })
  return withDensity(resvg.render().asPng(), PNG_DPI)
}

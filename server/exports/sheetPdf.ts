/**
 * The calc-package sheet as a PDF: A4, Source Sans 3 embedded, the spectrum plot drawn as
 * vector graphics from the same SVG the browser shows (shared/charts/spectrumChart.ts via
 * svg-to-pdfkit), and Ordinate's title block at the foot of every page.
 *
 * The output is a function of the sheet alone: the document dates and the file ID come
 * from the sheet's date, so the same sheet always gives the same bytes.
 */
import PDFDocument from 'pdfkit'
import SVGtoPDF from 'svg-to-pdfkit'
import { palette } from '../../shared/charts/palette.js'
import { chartSvg } from '../../shared/charts/chartSvg.js'
import type { Sheet, SheetField, SheetTable } from '../../shared/schemas/sheets.js'
import { exportFontFiles, printableDeep } from './exportFonts.js'

type Doc = PDFKit.PDFDocument

const PAGE_WIDTH_PT = 595.28
const PAGE_HEIGHT_PT = 841.89
const LEFT = 42
const RIGHT = PAGE_WIDTH_PT - 42
const WIDTH = RIGHT - LEFT
const HEADER_TOP = 30
const CONTENT_TOP = 62
const TITLE_BLOCK_HEIGHT = 78
const TITLE_BLOCK_TOP = PAGE_HEIGHT_PT - 30 - TITLE_BLOCK_HEIGHT
const CONTENT_BOTTOM = TITLE_BLOCK_TOP - 14

const REGULAR = 'Sans'
const SEMIBOLD = 'Sans-Semibold'

const BODY_SIZE = 9

/** Lays content down the page, starting a new page when the next block does not fit. */
class SheetWriter {
  y = CONTENT_TOP

  constructor(private readonly doc: Doc) {}

  private ensure(heightPt: number) {
    if (this.y + heightPt > CONTENT_BOTTOM && this.y > CONTENT_TOP) {
      this.doc.addPage()
      this.y = CONTENT_TOP
    }
  }

  gap(pt: number) {
    this.y += pt
  }

  title(text: string, subtitle: string) {
    const { doc } = this
    doc.font(SEMIBOLD).fontSize(15).fillColor(palette.text)
    doc.text(text, LEFT, this.y, { width: WIDTH })
    this.y = doc.y + 2
    doc.font(REGULAR).fontSize(BODY_SIZE).fillColor(palette.textMuted)
    doc.text(subtitle, LEFT, this.y, { width: WIDTH })
    this.y = doc.y + 8
  }

  /** A numbered section heading, kept on one page with the first `keepWithPt` of what follows. */
  heading(number: number, text: string, keepWithPt = 40) {
    const { doc } = this
    this.ensure(keepWithPt + 30)
    this.y += 6
    doc.font(SEMIBOLD).fontSize(10.5).fillColor(palette.ink)
    doc.text(`${number}  ${text}`, LEFT, this.y, { width: WIDTH })
    this.y = doc.y + 2
    rule(doc, this.y, RIGHT, 0.6, palette.ink)
    this.y += 5
  }

  subheading(text: string) {
    const { doc } = this
    this.ensure(28)
    doc.font(SEMIBOLD).fontSize(BODY_SIZE).fillColor(palette.text)
    doc.text(text, LEFT, this.y, { width: WIDTH })
    this.y = doc.y + 2
  }

  /** Label and value pairs, one per line, the value column wrapping. */
  fields(fields: SheetField[]) {
    const { doc } = this
    const labelWidth = 128
    const valueWidth = WIDTH - labelWidth - 8
    for (const field of fields) {
      doc.font(REGULAR).fontSize(BODY_SIZE)
      const height = Math.max(
        doc.heightOfString(field.label, { width: labelWidth }),
        doc.heightOfString(field.value, { width: valueWidth }),
      )
      this.ensure(height + 2)
      doc.fillColor(palette.textMuted).text(field.label, LEFT, this.y, { width: labelWidth })
      doc.fillColor(palette.text).text(field.value, LEFT + labelWidth + 8, this.y, { width: valueWidth })
      this.y += height + 2
    }
  }

  paragraph(text: string, colour: string = palette.text) {
    const { doc } = this
    doc.font(REGULAR).fontSize(BODY_SIZE)
    const height = doc.heightOfString(text, { width: WIDTH })
    this.ensure(height + 2)
    doc.fillColor(colour).text(text, LEFT, this.y, { width: WIDTH })
    this.y += height + 3
  }

  chart(svg: string, widthPx: number, heightPx: number) {
    const height = (WIDTH * heightPx) / widthPx
    this.ensure(height)
    SVGtoPDF(this.doc, svg, LEFT, this.y, {
      width: WIDTH,
      height,
      preserveAspectRatio: 'xMidYMid meet',
      fontCallback: (_family, bold) => (bold ? SEMIBOLD : REGULAR),
      warningCallback: (message) => {
        throw new Error(`the chart could not be drawn into the PDF: ${message}`)
      },
    })
    this.y += height + 4
  }

  /** A table whose cells wrap; the header is repeated on each page the table runs onto. */
  table(table: SheetTable) {
    const { doc } = this
    const columns = table.columns.length
    const firstWidth = columns > 6 ? 92 : 150
    const cellWidth = Math.min(
      columns > 2 ? 76 : WIDTH - firstWidth,
      (WIDTH - firstWidth) / Math.max(1, columns - 1),
    )
    const tableWidth = firstWidth + cellWidth * (columns - 1)
    const columnX = (i: number) => (i === 0 ? LEFT : LEFT + firstWidth + (i - 1) * cellWidth)
    const columnWidth = (i: number) => (i === 0 ? firstWidth : cellWidth) - 6
    const align = (i: number) => (i === 0 ? 'left' : 'right')
    const rowHeight = (cells: string[]) =>
      Math.max(...cells.map((cell, i) => doc.heightOfString(cell, { width: columnWidth(i) }))) + 5
    const header = () => {
      doc.font(SEMIBOLD).fontSize(8).fillColor(palette.text)
      const height = rowHeight(table.columns)
      table.columns.forEach((c, i) => {
        doc.text(c, columnX(i) + 3, this.y + 2, { width: columnWidth(i), align: align(i) })
      })
      this.y += height
      rule(doc, this.y, LEFT + tableWidth, 0.8, palette.ink)
    }
    this.subheading(table.title)
    this.ensure(40)
    header()
    table.rows.forEach((row, r) => {
      const cells = [row.label, ...row.cells]
      doc.font(row.emphasis ? SEMIBOLD : REGULAR).fontSize(8)
      const height = rowHeight(cells)
      if (this.y + height > CONTENT_BOTTOM) {
        doc.addPage()
        this.y = CONTENT_TOP
        header()
        doc.font(row.emphasis ? SEMIBOLD : REGULAR).fontSize(8)
      }
      if (r % 2 === 1) doc.rect(LEFT, this.y, tableWidth, height).fillColor(palette.paper).fill()
      doc.fillColor(palette.text)
      cells.forEach((cell, i) => {
        doc.text(cell, columnX(i) + 3, this.y + 2.5, { width: columnWidth(i), align: align(i) })
      })
      this.y += height
    })
    rule(doc, this.y, LEFT + tableWidth, 0.5, palette.ruleStrong)
    this.y += 4
    for (const note of table.notes) {
      doc.font(REGULAR).fontSize(7.5).fillColor(palette.textMuted)
      const height = doc.heightOfString(note, { width: WIDTH })
      this.ensure(height)
      doc.text(note, LEFT, this.y, { width: WIDTH })
      this.y += height + 1
    }
    this.y += 4
  }

  /** The cautions, boxed with an ochre rule so they are not read past. */
  cautions(title: string, lines: string[]) {
    const { doc } = this
    const inner = WIDTH - 20
    doc.font(REGULAR).fontSize(BODY_SIZE)
    const body = lines.reduce((h, line) => h + doc.heightOfString(line, { width: inner }) + 3, 0)
    const height = body + 26
    this.ensure(height + 6)
    this.y += 6
    doc.rect(LEFT, this.y, WIDTH, height).fillColor(palette.ochreSoft).fill()
    doc.rect(LEFT, this.y, 3, height).fillColor(palette.ochre).fill()
    doc.font(SEMIBOLD).fontSize(10).fillColor(palette.ochrePressed)
    doc.text(title, LEFT + 12, this.y + 7, { width: inner })
    let y = this.y + 22
    doc.font(REGULAR).fontSize(BODY_SIZE).fillColor(palette.text)
    for (const line of lines) {
      doc.text(line, LEFT + 12, y, { width: inner })
      y += doc.heightOfString(line, { width: inner }) + 3
    }
    this.y += height + 4
  }
}

interface Cell {
  label: string
  value: string
  x: number
  y: number
  width: number
  height: number
}

function drawCell(doc: Doc, cell: Cell) {
  doc.rect(cell.x, cell.y, cell.width, cell.height).lineWidth(0.6).strokeColor(palette.ruleStrong).stroke()
  doc.font(REGULAR).fontSize(6).fillColor(palette.textMuted)
  doc.text(cell.label.toUpperCase(), cell.x + 4, cell.y + 3, {
    width: cell.width - 8,
    height: 7,
    characterSpacing: 0.4,
    ellipsis: true,
  })
  doc.font(REGULAR).fontSize(8.5).fillColor(palette.text)
  doc.text(cell.value, cell.x + 4, cell.y + 11, {
    width: cell.width - 8,
    height: 11,
    ellipsis: true,
    lineBreak: false,
  })
}

/**
 * Ordinate's title block: an ink column with the product and version on the left, then
 * three ruled rows (who and what; which sheet; review) so the sheet can be filed and traced.
 */
function drawTitleBlock(doc: Doc, sheet: Sheet, page: number, pages: number) {
  const top = TITLE_BLOCK_TOP
  const rowHeight = TITLE_BLOCK_HEIGHT / 3
  const brandWidth = 86
  const x0 = LEFT + brandWidth
  const rest = WIDTH - brandWidth
  doc.rect(LEFT, top, brandWidth, TITLE_BLOCK_HEIGHT).fillColor(palette.ink).fill()
  doc.font(SEMIBOLD).fontSize(12).fillColor(palette.surface)
  doc.text(sheet.product.name, LEFT + 8, top + 9, { width: brandWidth - 16, lineBreak: false })
  doc.font(REGULAR).fontSize(7.5).fillColor(palette.inkSoft)
  doc.text(`version ${sheet.product.version}`, LEFT + 8, top + 26, {
    width: brandWidth - 16,
    lineBreak: false,
  })
  doc.text('calculation aid', LEFT + 8, top + TITLE_BLOCK_HEIGHT - 16, {
    width: brandWidth - 16,
    lineBreak: false,
  })

  const w = (f: number) => rest * f
  const rows: Array<Array<{ label: string; value: string; fraction: number }>> = [
    [
      { label: 'Firm', value: sheet.firmName, fraction: 0.36 },
      { label: 'Project', value: sheet.projectName, fraction: 0.4 },
      { label: 'Sheet', value: sheet.reference, fraction: 0.24 },
    ],
    [
      { label: 'Title', value: sheet.title, fraction: 0.52 },
      {
        label: sheet.dateShortLabel,
        value: sheet.dateText,
        fraction: 0.24,
      },
      { label: 'Revision', value: String(sheet.revision), fraction: 0.1 },
      { label: 'Page', value: `${page} of ${pages}`, fraction: 0.14 },
    ],
    [
      {
        label: 'Prepared by',
        value: joinNameDate(sheet.review.preparedBy, sheet.review.preparedOn),
        fraction: 0.38,
      },
      {
        label: 'Checked by',
        value: joinNameDate(sheet.review.checkedBy, sheet.review.checkedOn),
        fraction: 0.38,
      },
      { label: 'Review state', value: sheet.review.stateLabel, fraction: 0.24 },
    ],
  ]
  rows.forEach((row, r) => {
    let x = x0
    for (const cell of row) {
      const width = w(cell.fraction)
      drawCell(doc, {
        label: cell.label,
        value: cell.value,
        x,
        y: top + r * rowHeight,
        width,
        height: rowHeight,
      })
      x += width
    }
  })
}

function joinNameDate(name: string | null, date: string | null): string {
  if (!name) return '—'
  return date ? `${name}, ${date}` : name
}

function drawHeader(doc: Doc, sheet: Sheet) {
  doc.font(SEMIBOLD).fontSize(8).fillColor(palette.ink)
  doc.text(sheet.product.name.toUpperCase(), LEFT, HEADER_TOP, { lineBreak: false })
  doc.font(REGULAR).fontSize(8).fillColor(palette.textMuted)
  doc.text(
    `${sheet.reference} · revision ${sheet.revision} · ${sheet.dateLabel.toLowerCase()} ${sheet.dateText}`,
    LEFT,
    HEADER_TOP,
    { width: WIDTH, align: 'right', lineBreak: false },
  )
  rule(doc, HEADER_TOP + 13, RIGHT, 1.2, palette.ink)
}

/** A horizontal rule at `y` from the left margin to `rightX`. */
function rule(doc: Doc, y: number, rightX: number, lineWidthPt: number, colour: string) {
  doc.moveTo(LEFT, y).lineTo(rightX, y).lineWidth(lineWidthPt).strokeColor(colour).stroke()
}

/** Renders the sheet; the same sheet gives the same bytes. */
export async function renderSheetPdf(sheetModel: Sheet): Promise<Buffer> {
  const fonts = exportFontFiles()
  const sheet = printableDeep(sheetModel)
  const date = new Date(sheet.dateMs)
  const doc = new PDFDocument({
    size: 'A4',
    margin: 0,
    bufferPages: true,
    autoFirstPage: true,
    displayTitle: true,
    lang: 'en',
    info: {
      Title: `${sheet.title} (${sheet.reference}, revision ${sheet.revision})`,
      Subject: `Calculation sheet for ${sheet.projectName}, ${sheet.firmName}`,
      Creator: `${sheet.product.name} ${sheet.product.version}`,
      Producer: `${sheet.product.name} ${sheet.product.version}`,
      CreationDate: date,
      ModDate: date,
    },
  })
  const chunks: Buffer[] = []
  doc.on('data', (chunk: Buffer) => chunks.push(chunk))
  const finished = new Promise<void>((resolve, reject) => {
    doc.on('end', resolve)
    doc.on('error', reject)
  })
  doc.registerFont(REGULAR, fonts.regular)
  doc.registerFont(SEMIBOLD, fonts.semibold)

  const writer = new SheetWriter(doc)
  writer.title(
    sheet.title,
    `${sheet.dateLabel}: ${sheet.dateText} · revision ${sheet.revision} · ${sheet.reference}`,
  )
  let section = 0
  sheet.records.forEach((record, i) => {
    if (i === 0) writer.heading(++section, sheet.records.length > 1 ? 'Records' : 'Record')
    writer.subheading(record.name)
    writer.fields(record.fields)
    writer.gap(3)
  })
  writer.heading(++section, 'Method')
  writer.fields(sheet.method)
  const svg = chartSvg(sheet.chart)
  const chartWidthPx = sheet.chart.options.widthPx ?? 720
  // A long legend makes the chart taller than asked (shared/charts/spectrumChart.ts): use its own height.
  const chartHeightPx = Number(
    /viewBox="0 0 [\d.]+ ([\d.]+)"/.exec(svg)?.[1] ?? sheet.chart.options.heightPx ?? 440,
  )
  writer.heading(++section, 'Spectrum', (WIDTH * chartHeightPx) / chartWidthPx)
  writer.chart(svg, chartWidthPx, chartHeightPx)
  if (sheet.comparison) {
    writer.heading(++section, 'Target and scaling')
    writer.fields(sheet.comparison.target)
    writer.gap(3)
    writer.fields(sheet.comparison.scaling)
  }
  writer.heading(++section, sheet.kind === 'run' ? 'Ordinates' : 'Scale factors and ordinates')
  for (const table of sheet.tables) writer.table(table)
  if (sheet.warnings.length > 0) {
    writer.heading(++section, 'Warnings on the input')
    for (const warning of sheet.warnings) writer.paragraph(`• ${warning}`, palette.ochrePressed)
  }
  writer.heading(++section, 'Review')
  writer.fields([
    { label: 'State', value: sheet.review.stateLabel },
    { label: 'Prepared by', value: joinNameDate(sheet.review.preparedBy, sheet.review.preparedOn) },
    { label: 'Submitted for checking', value: sheet.review.submittedOn ?? '—' },
    { label: 'Checked by', value: joinNameDate(sheet.review.checkedBy, sheet.review.checkedOn) },
  ])
  writer.paragraph(sheet.review.note, palette.textMuted)
  writer.cautions('Cautions', sheet.cautions)

  const range = doc.bufferedPageRange()
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i)
    drawHeader(doc, sheet)
    drawTitleBlock(doc, sheet, i - range.start + 1, range.count)
  }
  doc.end()
  await finished
  return Buffer.concat(chunks)
}

import { z } from 'zod'
import { unitSystemSchema } from './me.js'
import { type DisplayUnit, type SpectrumQuantity, displayUnits, spectrumQuantities } from '../charts/units.js'
import { reviewStateSchema } from '../vocabulary/reviewStates.js'

/**
 * The calc-package sheet of a run or a comparison, as the server builds it
 * (server/services/exports.ts). The PDF and the browser's print preview lay out this
 * one model, so they show the same words and numbers. Text fields are display-ready
 * strings; the chart travels as the inputs of shared/charts/spectrumChart.ts.
 */

/**
 * Chart ordinates. A gap in a curve is NaN, which JSON carries as null: read back as NaN,
 * so the chart skips the point rather than drawing it at zero.
 */
const numbers = z.array(
  z
    .number()
    .nullable()
    .transform((v) => v ?? Number.NaN),
)

const QUANTITIES = Object.keys(spectrumQuantities) as [SpectrumQuantity, ...SpectrumQuantity[]]
const UNITS = Object.keys(displayUnits) as [DisplayUnit, ...DisplayUnit[]]
const quantitySchema = z.enum(QUANTITIES, { error: `quantity is one of ${QUANTITIES.join(', ')}.` })
const unitSchema = z.enum(UNITS, { error: `unit is one of ${UNITS.join(', ')}.` })
const scaleSchema = z.enum(['log', 'linear'], { error: 'An axis scale is log or linear.' })

export const chartSeriesSchema = z.object({
  label: z.string(),
  periodsS: numbers,
  values: numbers,
  role: z.enum(['record', 'mean', 'band', 'target', 'target90']),
  dampingRatio: z.number().optional(),
  dash: z.string().optional(),
  colour: z.string().optional(),
})

export const spectrumChartInputSchema = z.object({
  data: z.object({
    series: z.array(chartSeriesSchema),
    band: z.object({ label: z.string(), periodsS: numbers, lower: numbers, upper: numbers }).optional(),
    shortfall: z.object({ label: z.string(), periodsS: numbers, lower: numbers, upper: numbers }).optional(),
  }),
  options: z.object({
    quantity: quantitySchema,
    unit: unitSchema.optional(),
    xScale: scaleSchema.optional(),
    yScale: scaleSchema.optional(),
    widthPx: z.number().optional(),
    heightPx: z.number().optional(),
    title: z.string().optional(),
    note: z.string().optional(),
    periodRange: z.object({ minS: z.number(), maxS: z.number(), label: z.string().optional() }).optional(),
    /** Longest usable period of a high-pass filtered record, s; longer periods are shaded. */
    usablePeriodMaxS: z.number().optional(),
    xDomainS: z.tuple([z.number(), z.number()]).optional(),
    yDomain: z.tuple([z.number(), z.number()]).optional(),
    id: z.string().optional(),
    /** Draw the four-way log plot (shared/charts/tripartiteChart.ts) with these scale units. */
    tripartite: z
      .object({ velocity: unitSchema, displacement: unitSchema, acceleration: unitSchema })
      .optional(),
  }),
})
export type SpectrumChartInput = z.infer<typeof spectrumChartInputSchema>

/** A labelled value: "Δt" → "0.005 s". */
export const sheetFieldSchema = z.object({ label: z.string(), value: z.string() })
export type SheetField = z.infer<typeof sheetFieldSchema>

/** A table of display strings; the first column holds the row labels. */
export const sheetTableSchema = z.object({
  title: z.string(),
  columns: z.array(z.string()),
  rows: z.array(
    z.object({ label: z.string(), cells: z.array(z.string()), emphasis: z.boolean().optional() }),
  ),
  notes: z.array(z.string()),
})
export type SheetTable = z.infer<typeof sheetTableSchema>

export const sheetRecordSchema = z.object({
  name: z.string(),
  fields: z.array(sheetFieldSchema),
})
export type SheetRecord = z.infer<typeof sheetRecordSchema>

export const sheetReviewSchema = z.object({
  state: reviewStateSchema,
  stateLabel: z.string(),
  preparedBy: z.string(),
  preparedOn: z.string(),
  submittedOn: z.string().nullable(),
  checkedBy: z.string().nullable(),
  checkedOn: z.string().nullable(),
  /** One line on what the state means for use of the sheet. */
  note: z.string(),
})
export type SheetReview = z.infer<typeof sheetReviewSchema>

export const sheetSchema = z.object({
  kind: z.enum(['run', 'comparison']),
  /** The sheet's reference, e.g. "ORD-R-3F2A9C1B". */
  reference: z.string(),
  title: z.string(),
  product: z.object({ name: z.string(), version: z.string() }),
  firmName: z.string(),
  projectName: z.string(),
  revision: z.number().int().positive(),
  /** The sheet's date: the date of the check for checked work, otherwise when the work was done. */
  dateMs: z.number(),
  dateText: z.string(),
  /** What the date is, e.g. "Date of check". */
  dateLabel: z.string(),
  /** The same, short enough for a title-block cell: "Date of check" or "Date, not checked". */
  dateShortLabel: z.string(),
  records: z.array(sheetRecordSchema),
  method: z.array(sheetFieldSchema),
  chart: spectrumChartInputSchema,
  /** Ordinates at the standard periods, then any comparison tables. */
  tables: z.array(sheetTableSchema),
  comparison: z.object({ target: z.array(sheetFieldSchema), scaling: z.array(sheetFieldSchema) }).nullable(),
  review: sheetReviewSchema,
  warnings: z.array(z.string()),
  cautions: z.array(z.string()),
})
export type Sheet = z.infer<typeof sheetSchema>

export const EXPORT_WIDTH_MM = { min: 50, max: 400, default: 170 } as const

/**
 * The query of the exports. The plot exports (PNG, SVG) draw the view the engineer has on
 * screen when it is given (quantity, unit, axis scales, scaled records); the PDF sheet
 * always shows its own chart.
 */
export const plotExportQuerySchema = z
  .strictObject({
    widthMm: z.coerce
      .number({ error: 'widthMm must be a number of millimetres.' })
      .min(EXPORT_WIDTH_MM.min, `widthMm must be at least ${EXPORT_WIDTH_MM.min} mm.`)
      .max(EXPORT_WIDTH_MM.max, `widthMm must be at most ${EXPORT_WIDTH_MM.max} mm.`)
      .default(EXPORT_WIDTH_MM.default),
    quantity: quantitySchema.optional(),
    unit: unitSchema.optional(),
    xScale: scaleSchema.optional(),
    yScale: scaleSchema.optional(),
    /** The four-way log plot (PSV with SD and PSA diagonals) instead of the spectrum chart. */
    chart: z.enum(['spectrum', 'tripartite'], { error: 'chart is spectrum or tripartite.' }).optional(),
    /** The units of the file: the member's preference unless given (JSON answers stay SI). */
    units: unitSystemSchema.optional(),
    /** Comparisons: draw the records as scaled (the default) or as recorded. */
    scaled: z
      .enum(['true', 'false'], { error: 'scaled is true or false.' })
      .transform((v) => v === 'true')
      .optional(),
  })
  .refine((q) => !q.unit || displayUnits[q.unit].kind === spectrumQuantities[q.quantity ?? 'PSA'].kind, {
    message: 'unit does not measure the quantity (for example SD in g).',
    path: ['unit'],
  })
export type PlotExportQuery = z.infer<typeof plotExportQuerySchema>

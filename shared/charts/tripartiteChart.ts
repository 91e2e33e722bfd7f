/**
 * The four-way log plot (Veletsos & Newmark 1960; Newmark & Hall 1982): pseudo-spectral
 * velocity against period on log-log axes, with diagonal scales of spectral displacement
 * and pseudo-spectral acceleration, so one curve reads all three:
 *
 *   SD = PSV·T/(2π)   (lines of constant SD fall with slope −1 in log-log)
 *   PSA = PSV·2π/T    (lines of constant PSA rise with slope +1)
 *
 * Data in, SVG text out, no DOM: the same builder draws the screen and the exports. The
 * frame, curves, band, legend and period range are the spectrum chart's own
 * (shared/charts/spectrumChart.ts, called with PSV on log-log axes); this module adds the
 * diagonal grids and their scales under the curves.
 */
import { scaleLog } from 'd3-scale'
import { formatTick } from './axes.js'
import { palette } from './palette.js'
import {
  type SpectrumChart,
  type SpectrumChartData,
  type SpectrumChartOptions,
  type SpectrumSeries,
  buildSpectrumChart,
} from './spectrumChart.js'
import type { UnitSystem } from '../schemas/me.js'
import { FONT_FAMILY, escapeXml, px, safeId } from './svgMarkup.js'
import { type DisplayUnit, type SpectrumQuantity, checkUnit, displayUnits } from './units.js'

/** The units of the three scales of the plot. */
export interface TripartiteUnits {
  velocity: DisplayUnit
  displacement: DisplayUnit
  acceleration: DisplayUnit
}

/**
 * SI plots read PSV in cm/s and SD in cm; US customary in in/s and in. PSA is in g in both,
 * as codes state design spectra.
 */
export const TRIPARTITE_UNITS: Record<UnitSystem, TripartiteUnits> = {
  si: { velocity: 'cm/s', displacement: 'cm', acceleration: 'g' },
  us: { velocity: 'in/s', displacement: 'in', acceleration: 'g' },
}

/** Quantities that convert exactly to PSV at a period; SA and SV are not pseudo-quantities. */
const PSV_FROM: Partial<Record<SpectrumQuantity, (valueSI: number, periodS: number) => number>> = {
  PSV: (v) => v,
  PSA: (v, t) => (v * t) / (2 * Math.PI),
  SD: (v, t) => (v * 2 * Math.PI) / t,
}

export interface TripartiteChartOptions extends Omit<
  SpectrumChartOptions,
  'quantity' | 'unit' | 'xScale' | 'yScale' | 'yDomain'
> {
  /** The quantity the series' values hold (in SI); converted to PSV period by period. */
  quantity: SpectrumQuantity
  units?: TripartiteUnits
}

/** A diagonal as drawn, so a test or a readout can find it. */
export interface TripartiteDiagonal {
  quantity: 'SD' | 'PSA'
  /** In the scale's display unit. */
  value: number
  labelled: boolean
  x1: number
  y1: number
  x2: number
  y2: number
}

export interface TripartiteChart extends SpectrumChart {
  diagonals: TripartiteDiagonal[]
  units: TripartiteUnits
}

/** PSV (m/s) from values of `quantity` in SI at their periods; a RangeError for SA or SV. */
export function toPsv(
  quantity: SpectrumQuantity,
  periodsS: ArrayLike<number>,
  values: ArrayLike<number>,
): number[] {
  const convert = PSV_FROM[quantity]
  if (!convert) throw new RangeError(`the four-way plot needs PSA, PSV or SD values, not ${quantity}`)
  return Array.from(values, (v, i) => convert(v, periodsS[i] ?? Number.NaN))
}

/** Decade-rounded extent of the positive finite values. */
function decadeDomain(values: number[], fallback: [number, number]): [number, number] {
  let lo = Infinity
  let hi = -Infinity
  for (const v of values) {
    if (!(v > 0) || !Number.isFinite(v)) continue
    if (v < lo) lo = v
    if (v > hi) hi = v
  }
  if (!(hi >= lo)) return fallback
  const first = 10 ** Math.floor(Math.log10(lo))
  let last = 10 ** Math.ceil(Math.log10(hi))
  if (!(last > first)) last = first * 10
  return [Number(first.toPrecision(12)), Number(last.toPrecision(12))]
}

/** Diagonal values: every 1, 2 and 5 × 10^e within [lo, hi], decades labelled. */
function diagonalValues(lo: number, hi: number): Array<{ value: number; labelled: boolean }> {
  const out: Array<{ value: number; labelled: boolean }> = []
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
    for (const k of [1, 2, 5]) {
      const value = Number((k * 10 ** e).toPrecision(12))
      if (value >= lo && value <= hi) out.push({ value, labelled: k === 1 })
    }
  }
  return out
}

/**
 * Where the line log y = log c + slope·log T crosses the plot rectangle: clips the segment
 * between the left and right edges to the bottom and top edges. Null when it misses.
 */
function clipDiagonal(
  psvAt: (periodS: number) => number,
  inversePeriod: (psv: number) => number,
  xDomainS: [number, number],
  yDomain: [number, number],
): [number, number, number, number] | null {
  let t1 = xDomainS[0]
  let t2 = xDomainS[1]
  let v1 = psvAt(t1)
  let v2 = psvAt(t2)
  const clamp = (v: number) => Math.min(yDomain[1], Math.max(yDomain[0], v))
  if ((v1 < yDomain[0] && v2 < yDomain[0]) || (v1 > yDomain[1] && v2 > yDomain[1])) return null
  if (v1 !== clamp(v1)) {
    v1 = clamp(v1)
    t1 = inversePeriod(v1)
  }
  if (v2 !== clamp(v2)) {
    v2 = clamp(v2)
    t2 = inversePeriod(v2)
  }
  return t2 > t1 ? [t1, v1, t2, v2] : null
}

/**
 * Builds the four-way plot. Values arrive in SI as `options.quantity` (PSA, PSV or SD) and
 * are drawn as PSV; throws a RangeError for SA or SV, or for units that do not suit their scale.
 */
export function buildTripartiteChart(
  data: SpectrumChartData,
  options: TripartiteChartOptions,
): TripartiteChart {
  const units = options.units ?? TRIPARTITE_UNITS.si
  if (!PSV_FROM[options.quantity]) {
    throw new RangeError(`the four-way plot needs PSA, PSV or SD values, not ${options.quantity}`)
  }
  checkUnit('velocity', units.velocity)
  checkUnit('displacement', units.displacement)
  checkUnit('acceleration', units.acceleration)
  const id = safeId(options.id ?? 'ordinate-tripartite')

  const series: SpectrumSeries[] = data.series.map((s) => ({
    ...s,
    values: toPsv(options.quantity, s.periodsS, s.values),
  }))
  const band = data.band
    ? {
        ...data.band,
        lower: toPsv(options.quantity, data.band.periodsS, data.band.lower),
        upper: toPsv(options.quantity, data.band.periodsS, data.band.upper),
      }
    : undefined
  const vSI = displayUnits[units.velocity].siPerUnit
  const dSI = displayUnits[units.displacement].siPerUnit
  const aSI = displayUnits[units.acceleration].siPerUnit

  const allPeriods = [...series.flatMap((s) => Array.from(s.periodsS)), ...Array.from(band?.periodsS ?? [])]
  const xDomainS = options.xDomainS ?? decadeDomain(allPeriods, [0.01, 10])
  const allPsv = [
    ...series.flatMap((s) => Array.from(s.values)),
    ...(band ? [...band.lower, ...band.upper] : []),
  ].map((v) => v / vSI)
  const yDomain = decadeDomain(allPsv, [0.1, 100])

  const { quantity: _quantity, units: _units, ...rest } = options
  const base = buildSpectrumChart(
    { series, ...(band ? { band } : {}) },
    {
      ...rest,
      title: options.title,
      id,
      quantity: 'PSV',
      unit: units.velocity,
      xScale: 'log',
      yScale: 'log',
      xDomainS,
      yDomain,
    },
  )
  const { plot } = base.frame
  const x = scaleLog()
    .domain(xDomainS)
    .range([plot.left, plot.left + plot.width])
  const y = scaleLog()
    .domain(yDomain)
    .range([plot.top + plot.height, plot.top])

  // PSV (display) at period T on the line of a given SD or PSA (display), and back.
  const lines = {
    SD: {
      psvAt: (value: number) => (t: number) => (2 * Math.PI * value * dSI) / t / vSI,
      periodAt: (value: number) => (psv: number) => (2 * Math.PI * value * dSI) / (psv * vSI),
      range: [
        (yDomain[0] * vSI * xDomainS[0]) / (2 * Math.PI) / dSI,
        (yDomain[1] * vSI * xDomainS[1]) / (2 * Math.PI) / dSI,
      ],
    },
    PSA: {
      psvAt: (value: number) => (t: number) => (value * aSI * t) / (2 * Math.PI) / vSI,
      periodAt: (value: number) => (psv: number) => (2 * Math.PI * psv * vSI) / (value * aSI),
      range: [
        (yDomain[0] * vSI * 2 * Math.PI) / xDomainS[1] / aSI,
        (yDomain[1] * vSI * 2 * Math.PI) / xDomainS[0] / aSI,
      ],
    },
  } as const

  const diagonals: TripartiteDiagonal[] = []
  const markup: string[] = []
  const labels: string[] = []
  // Labels closer than this to one already placed are left off, so crossings stay legible.
  const placed: Array<[number, number]> = []
  const LABEL_GAP_PX = 36
  for (const quantity of ['SD', 'PSA'] as const) {
    const spec = lines[quantity]
    const unit = quantity === 'SD' ? units.displacement : units.acceleration
    for (const { value, labelled } of diagonalValues(spec.range[0] as number, spec.range[1] as number)) {
      const seg = clipDiagonal(spec.psvAt(value), spec.periodAt(value), xDomainS, yDomain)
      if (!seg) continue
      const [t1, v1, t2, v2] = seg
      const d: TripartiteDiagonal = {
        quantity,
        value,
        labelled,
        x1: x(t1),
        y1: y(v1),
        x2: x(t2),
        y2: y(v2),
      }
      diagonals.push(d)
      markup.push(
        `<line x1="${px(d.x1)}" y1="${px(d.y1)}" x2="${px(d.x2)}" y2="${px(d.y2)}" stroke="${labelled ? palette.ruleStrong : palette.gridMajor}" stroke-width="${labelled ? 0.9 : 0.6}" stroke-dasharray="${quantity === 'SD' ? '5 3' : '1.5 2.5'}" data-diagonal="${quantity} ${formatTick(value)}"/>`,
      )
      if (!labelled) continue
      // Each line is labelled just inside where it enters the plot, turned along the line:
      // SD lines from the top or left edge, PSA lines from the left or bottom edge.
      const [lx, ly] = [d.x1, d.y1]
      const angle = Math.atan2(d.y2 - d.y1, d.x2 - d.x1)
      const along = 14
      const tx = lx + along * Math.cos(angle)
      const ty = ly + along * Math.sin(angle) - 3
      if (placed.some(([px0, py0]) => Math.hypot(px0 - tx, py0 - ty) < LABEL_GAP_PX)) continue
      placed.push([tx, ty])
      labels.push(
        `<text transform="translate(${px(tx)},${px(ty)}) rotate(${px((angle * 180) / Math.PI)})" text-anchor="start" fill="${palette.textMuted}" font-size="10">${escapeXml(`${formatTick(value)} ${unit}`)}</text>`,
      )
    }
  }
  const scaleTitles =
    `<text x="${px(plot.left + 4)}" y="${px(plot.top - 4)}" fill="${palette.text}" font-size="11" font-weight="600">SD (${escapeXml(units.displacement)})</text>` +
    `<text x="${px(plot.left + plot.width - 4)}" y="${px(plot.top - 4)}" text-anchor="end" fill="${palette.text}" font-size="11" font-weight="600">PSA (${escapeXml(units.acceleration)})</text>`

  const anchor = `<g clip-path="url(#${id}-clip)">`
  const at = base.svg.indexOf(anchor)
  if (at < 0) throw new Error('the spectrum chart no longer marks its clipped curve group')
  const diagonalGroup = `<g clip-path="url(#${id}-clip)" font-family="${escapeXml(FONT_FAMILY)}">${markup.join('')}${labels.join('')}</g>`
  const end = base.svg.lastIndexOf('</svg>')
  let svg =
    base.svg.slice(0, at) + diagonalGroup + base.svg.slice(at, end) + scaleTitles + base.svg.slice(end)
  const titleText = options.title ?? 'Four-way log plot'
  svg = svg.replace(
    /<title id="([^"]+)-title">[^<]*<\/title>/,
    `<title id="$1-title">${escapeXml(titleText)}</title>`,
  )
  return { svg, frame: base.frame, diagonals, units }
}

/** The chart as SVG text; see {@link buildTripartiteChart}. */
export function tripartiteChartSvg(data: SpectrumChartData, options: TripartiteChartOptions): string {
  return buildTripartiteChart(data, options).svg
}

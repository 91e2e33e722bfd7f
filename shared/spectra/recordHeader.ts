/**
 * Reading the text around an acceleration record: which lines are values,
 * and what the header lines state about units, time step and point count.
 * Shared by the full parser and by the cheap header inspection the upload
 * form uses to decide which fields to ask for.
 */
import type { SourceUnits } from './units.js'

export type RecordFormat = 'single-column' | 'time-value' | 'headered'

/** Something a header line states, and where. */
export interface HeaderStatement<T> {
  value: T
  line: number
  text: string
}

export interface HeaderStatements {
  units: HeaderStatement<SourceUnits>[]
  dtS: HeaderStatement<number>[]
  points: HeaderStatement<number>[]
}

/** Splits text into lines after dropping a UTF-8 byte-order mark; accepts LF, CRLF and old-Mac CR. */
export function splitLines(text: string): string[] {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text
  return body.split(/\r\n|\r|\n/)
}

/** A decimal number, with an optional exponent (Fortran's D exponent too). */
export const NUMBER_RE = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eEdD][+-]?\d+)?$/
/** Spellings of values that are numbers to a program but not to an engineer. */
export const NON_FINITE_RE = /^[+-]?(?:nan|inf|infinity)$/i

export function toNumber(token: string): number {
  return Number(token.replace(/[dD]/, 'e'))
}

function isNumberLike(token: string): boolean {
  return NUMBER_RE.test(token) || NON_FINITE_RE.test(token)
}

/**
 * A line is a data line when every token on it (split on whitespace, commas
 * and semicolons, quotes dropped) reads as a number, NaN or Infinity, so a
 * stray NaN is reported as such instead of being taken for header text.
 */
export function isDataLine(line: string): boolean {
  const tokens = line.replace(/"/g, ' ').split(/[\s,;]+/)
  let count = 0
  for (const token of tokens) {
    if (token === '') continue
    if (!isNumberLike(token)) return false
    count++
  }
  return count > 0
}

export function isBlankOrComment(line: string): boolean {
  const trimmed = line.trim()
  return trimmed === '' || trimmed.startsWith('#')
}

const NUM = String.raw`([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)(?![\d.])`
const STATES = String.raw`\s*(?:[:=]|\bof\b|\bis\b)?\s*`

const DT_RE = new RegExp(
  String.raw`(?:\bdt\b|\bdelta[\s_-]*t\b|\btime[\s_-]*(?:step|increment|interval)\b|\bsampl(?:e|ing)[\s_-]*interval\b)` +
    String.raw`\s*(?:[([]\s*(s|secs?|ms)\s*[)\]])?` +
    STATES +
    NUM +
    String.raw`\s*(seconds?|secs?|s|msecs?|ms|milliseconds?)?(?![a-z])`,
  'i',
)
const RATE_RE = new RegExp(
  String.raw`(?:\bsampl(?:e|ing)[\s_-]*(?:rate|frequency)\b|\bsamples[\s_-]*per[\s_-]*second\b|\bsps\b)` +
    String.raw`\s*(?:[([]\s*hz\s*[)\]])?` +
    STATES +
    NUM,
  'i',
)
const RATE_SUFFIX_RE = new RegExp(
  NUM + String.raw`\s*(?:sps\b|samples?\s*(?:per|\/)\s*s(?:ec(?:ond)?)?\b)`,
  'i',
)
const POINTS_RE =
  /\b(?:npts|nsamples|n[\s_-]*(?:of[\s_-]*)?(?:points|samples|pts)|num(?:ber)?[\s_-]*(?:of[\s_-]*)?(?:points|samples|pts|values)|points|samples|pts|values)\s*(?:[:=]|\bis\b)\s*(\d+)(?![\d.])/i
const POINTS_SUFFIX_RE = /\b(\d+)\s*(?:points|samples|pts|values)\b(?!\s*(?:per\b|\/))/i

const PER_S2 = String.raw`\s*\/\s*s(?:ec)?\s*(?:\^?\s*2|²|\*\*\s*2|\/\s*s(?:ec)?\b)`
const PER_S2_EXP = String.raw`\s*s(?:ec)?\s*\^?\s*-\s*2`
/** Column names spell units with underscores: accel_m_s2, a_cm_per_s2, acc_in_s_2. */
const PER_S2_SNAKE = String.raw`_(?:per_)?s(?:ec)?_?2(?![a-z0-9])`
const UNIT_PATTERNS: readonly (readonly [SourceUnits, RegExp])[] = [
  [
    'cm/s2',
    new RegExp(String.raw`(?<![a-z])cm(?:${PER_S2}|${PER_S2_EXP}|${PER_S2_SNAKE})|\bgals?\b|\bcmps2\b`, 'i'),
  ],
  [
    'in/s2',
    new RegExp(String.raw`(?<![a-z])in(?:ch(?:es)?)?(?:${PER_S2}|${PER_S2_EXP}|${PER_S2_SNAKE})`, 'i'),
  ],
  ['m/s2', new RegExp(String.raw`(?<![a-z])m(?:${PER_S2}|${PER_S2_EXP}|${PER_S2_SNAKE})|\bmps2\b`, 'i')],
  [
    'g',
    new RegExp(
      [
        String.raw`\bunits?\b\s*(?:(?:are|is|of|in)\b)?\s*[:=]?\s*\(?\s*g\b(?!\s*\/)`,
        String.raw`[([]\s*g\s*[)\]]`,
        String.raw`\b(?:in|of)\s+(?:units\s+of\s+)?g\b(?!\s*\/)`,
        String.raw`\bacc(?:el(?:eration)?)?[\s_-]*g\b(?!\s*\/)`,
      ].join('|'),
      'i',
    ),
  ],
]

/** The acceleration units a line of text names, the earliest when it names several. */
export function unitsInText(text: string): SourceUnits | null {
  let best: SourceUnits | null = null
  let bestIndex = Infinity
  for (const [units, pattern] of UNIT_PATTERNS) {
    const match = pattern.exec(text)
    if (match && match.index < bestIndex) {
      best = units
      bestIndex = match.index
    }
  }
  return best
}

function timeStepInText(text: string): number | null {
  // A decimal comma ("dt = 0,005 s") is read as a decimal point, never as a time step of 0.
  const dt = DT_RE.exec(text.replace(/(\d),(\d)/g, '$1.$2'))
  if (dt) {
    const value = Number(dt[2])
    const unit = (dt[3] ?? dt[1] ?? 's').toLowerCase()
    if (!(value > 0)) return null
    return unit.startsWith('m') ? value / 1000 : value
  }
  const rate = RATE_RE.exec(text) ?? RATE_SUFFIX_RE.exec(text)
  if (rate) return 1 / Number(rate[1])
  return null
}

function pointsInText(text: string): number | null {
  const match = POINTS_RE.exec(text) ?? POINTS_SUFFIX_RE.exec(text)
  return match ? Number(match[1]) : null
}

export function emptyHeaderStatements(): HeaderStatements {
  return { units: [], dtS: [], points: [] }
}

/** Adds what one header line states about units, time step and point count. */
export function readHeaderLine(text: string, line: number, into: HeaderStatements): void {
  const units = unitsInText(text)
  if (units) into.units.push({ value: units, line, text: text.trim() })
  const dtS = timeStepInText(text)
  if (dtS !== null) into.dtS.push({ value: dtS, line, text: text.trim() })
  const points = pointsInText(text)
  if (points !== null) into.points.push({ value: points, line, text: text.trim() })
}

/** What the upload form needs to know before it asks for units or a time step. */
export interface RecordHeaderInfo {
  units: SourceUnits | null
  /** The time step the file gives, from a header line or a time column. */
  dtS: number | null
  dtSource: 'header' | 'time-column' | null
  points: number | null
  /** Best guess at the layout from the first value lines. */
  format: RecordFormat | null
}

const INSPECT_LINE_LIMIT = 400

/**
 * Reads the header and the first value lines only, so it is cheap on a large
 * file, and never throws: the full parse reports problems with line numbers.
 */
export function inspectRecordHeader(text: string): RecordHeaderInfo {
  const lines = splitLines(text.slice(0, 65_536))
  const statements = emptyHeaderStatements()
  const firstRows: number[][] = []
  for (let index = 0; index < lines.length && index < INSPECT_LINE_LIMIT && firstRows.length < 3; index++) {
    const line = lines[index] ?? ''
    if (firstRows.length === 0 && !isDataLine(line)) {
      readHeaderLine(line, index + 1, statements)
    } else if (!isBlankOrComment(line)) {
      firstRows.push(
        line
          .replace(/"/g, ' ')
          .split(/[\s,;]+/)
          .filter((token) => token !== '')
          .map(toNumber),
      )
    }
  }
  const statedDt = statements.dtS[0]?.value ?? null
  const statedPoints = statements.points[0]?.value ?? null
  const twoColumns = firstRows.length >= 2 && firstRows.every((row) => row.length === 2)
  const timeStep = twoColumns ? (firstRows[1]?.[0] ?? NaN) - (firstRows[0]?.[0] ?? NaN) : NaN
  const timeColumn =
    twoColumns && timeStep > 0 && (statedDt === null || Math.abs(timeStep - statedDt) <= 1e-3 * statedDt)
  let format: RecordFormat | null = null
  if (firstRows.length > 0) {
    if (timeColumn) format = 'time-value'
    else if (statedDt !== null || statedPoints !== null || firstRows.some((row) => row.length > 2))
      format = 'headered'
    else format = 'single-column'
  }
  return {
    units: statements.units[0]?.value ?? null,
    dtS: statedDt ?? (timeColumn ? timeStep : null),
    dtSource: statedDt !== null ? 'header' : timeColumn ? 'time-column' : null,
    points: statedPoints,
    format,
  }
}

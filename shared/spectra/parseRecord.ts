/**
 * Parses an acceleration record from text into SI units.
 *
 * Layouts read:
 * - `single-column`: one acceleration per line; the time step comes from the caller;
 * - `time-value`: two columns, time and acceleration, split by commas, semicolons,
 *   tabs or spaces, with or without a header row (quoted CSV fields allowed);
 * - `headered`: header lines that state the time step (`DT= 0.005 SEC`,
 *   `dt = 0.005 s`, `sampling rate 200 Hz`) and often the point count
 *   (`NPTS= 8001`, `points: 8001`), then values, several per line.
 *
 * Units come from the caller or a header line, column names included (`acc (g)`,
 * `accel_m_s2`, `a [cm/s2]`, `in/s^2`). Values that look like the wrong units (PGA above 4 g or
 * below 0.0005 g) or a time step above 0.1 s only warn (shared/spectra/unitPlausibility.ts).
 * Every rejection is a {@link RecordParseError} naming the line and what to fix.
 */
import { parse as parseCsv } from 'csv-parse/browser/esm/sync'
import {
  type HeaderStatements,
  type RecordFormat,
  NON_FINITE_RE,
  NUMBER_RE,
  emptyHeaderStatements,
  isBlankOrComment,
  isDataLine,
  readHeaderLine,
  splitLines,
  toNumber,
} from './recordHeader.js'
import { unitPlausibilityWarnings } from './unitPlausibility.js'
import { M_PER_S2_PER_UNIT, STANDARD_GRAVITY_M_PER_S2, type SourceUnits, isSourceUnits } from './units.js'

export { inspectRecordHeader, type RecordHeaderInfo, type RecordFormat } from './recordHeader.js'
export type { SourceUnits } from './units.js'

export const MIN_RECORD_POINTS = 16
export const MAX_RECORD_POINTS = 2_000_000
/** Accelerations above this, after conversion, almost always mean the wrong units. */
export const MAX_PLAUSIBLE_ACCEL_G = 20

export interface ParseRecordOptions {
  units?: SourceUnits
  dtS?: number
}

export interface ParsedRecord {
  accelMPerS2: Float64Array
  dtS: number
  points: number
  sourceUnits: SourceUnits
  format: RecordFormat
  warnings: string[]
}

export type RecordParseErrorCode =
  | 'invalid_option'
  | 'empty'
  | 'not_text'
  | 'no_values'
  | 'malformed_csv'
  | 'non_numeric'
  | 'not_finite'
  | 'column_count'
  | 'time_not_increasing'
  | 'time_not_uniform'
  | 'points_mismatch'
  | 'too_few_points'
  | 'too_many_points'
  | 'implausible_amplitude'
  | 'dt_missing'
  | 'dt_conflict'
  | 'units_missing'
  | 'units_conflict'

/** The only error {@link parseRecord} throws: a code, a message a person can act on, and the line. */
export class RecordParseError extends Error {
  override readonly name = 'RecordParseError'
  readonly code: RecordParseErrorCode
  readonly line: number | undefined

  constructor(code: RecordParseErrorCode, message: string, line?: number) {
    super(message)
    this.code = code
    this.line = line
  }
}

/** Values read from the data lines, flat, with the line and value count of each row. */
interface Rows {
  values: Float64Array
  /** Number of values in each row. */
  counts: Int32Array
  /** 1-based line number of each row. */
  lines: Int32Array
  /** Decimal quantum of the first value of each row as printed (for a time column's rounding). */
  firstQuantum: Float64Array
  rowCount: number
  valueCount: number
}

class RowReader {
  private values = new Float64Array(1024)
  private counts = new Int32Array(256)
  private lines = new Int32Array(256)
  private firstQuantum = new Float64Array(256)
  private rowCount = 0
  private valueCount = 0

  addRow(tokens: readonly string[], line: number): void {
    if (this.rowCount === this.counts.length) {
      this.counts = grow(this.counts)
      this.lines = grow(this.lines)
      this.firstQuantum = grow(this.firstQuantum)
    }
    let count = 0
    for (let column = 0; column < tokens.length; column++) {
      const token = (tokens[column] ?? '').trim()
      if (this.valueCount === this.values.length) this.values = grow(this.values)
      this.values[this.valueCount++] = readValue(token, line, column, tokens.length)
      count++
    }
    if (count === 0) return
    this.firstQuantum[this.rowCount] = printedQuantum((tokens[0] ?? '').trim())
    this.counts[this.rowCount] = count
    this.lines[this.rowCount] = line
    this.rowCount++
    if (this.valueCount > 2 * MAX_RECORD_POINTS) throw tooMany(line)
  }

  finish(): Rows {
    return {
      values: this.values.subarray(0, this.valueCount),
      counts: this.counts.subarray(0, this.rowCount),
      lines: this.lines.subarray(0, this.rowCount),
      firstQuantum: this.firstQuantum.subarray(0, this.rowCount),
      rowCount: this.rowCount,
      valueCount: this.valueCount,
    }
  }
}

function grow<T extends Float64Array | Int32Array>(array: T): T {
  const bigger = new (array.constructor as new (length: number) => T)(array.length * 2)
  bigger.set(array)
  return bigger
}

function tooMany(line: number): RecordParseError {
  return new RecordParseError(
    'too_many_points',
    `Line ${line}: the record has more than ${MAX_RECORD_POINTS.toLocaleString('en')} points, the most Ordinate reads. Split or decimate the record.`,
    line,
  )
}

function readValue(token: string, line: number, column: number, columns: number): number {
  const where = columns > 1 ? `Line ${line}, value ${column + 1}` : `Line ${line}`
  if (token === '') {
    throw new RecordParseError('non_numeric', `${where} is empty. Every value must be a number.`, line)
  }
  if (NUMBER_RE.test(token)) return toNumber(token)
  if (NON_FINITE_RE.test(token)) {
    throw new RecordParseError(
      'not_finite',
      `${where} is "${token}". Accelerations must be finite numbers; fill or trim the gap in the record.`,
      line,
    )
  }
  throw new RecordParseError(
    'non_numeric',
    `${where}: "${token.slice(0, 40)}" is not a number. After the header, lines must hold numbers only.`,
    line,
  )
}

/** The rounding step of a number as printed: 0.005 → 0.001, 5.00E-03 → 1e-5. */
function printedQuantum(token: string): number {
  const match = /^[+-]?(\d*)(?:\.(\d*))?(?:[eEdD]([+-]?\d+))?$/.exec(token)
  if (!match) return 0
  const decimals = match[2]?.length ?? 0
  const exponent = match[3] === undefined ? 0 : Number(match[3])
  return 10 ** (exponent - decimals)
}

function checkOptions(options: ParseRecordOptions): void {
  if (options.units !== undefined && !isSourceUnits(options.units)) {
    throw new RecordParseError(
      'invalid_option',
      `Units "${String(options.units)}" are not known; use g, m/s2, cm/s2 or in/s2.`,
    )
  }
  if (options.dtS !== undefined && !(Number.isFinite(options.dtS) && options.dtS > 0)) {
    throw new RecordParseError(
      'invalid_option',
      `The time step must be a positive number of seconds, not ${options.dtS}.`,
    )
  }
}

function readRows(lines: readonly string[], first: number): Rows {
  const reader = new RowReader()
  const firstLine = lines[first] ?? ''
  const delimiter = firstLine.includes(',') ? ',' : firstLine.includes(';') ? ';' : null
  if (delimiter === null) {
    for (let index = first; index < lines.length; index++) {
      const line = lines[index] ?? ''
      if (isBlankOrComment(line)) continue
      reader.addRow(line.trim().split(/\s+/), index + 1)
    }
    return reader.finish()
  }
  let records: { record: string[]; info: { lines: number } }[]
  try {
    records = parseCsv(lines.slice(first).join('\n'), {
      delimiter,
      relax_column_count: true,
      skip_empty_lines: true,
      trim: true,
      comment: '#',
      comment_no_infix: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[]
  } catch (error) {
    const csvLine = (error as { lines?: unknown }).lines
    const line = typeof csvLine === 'number' ? first + csvLine : undefined
    throw new RecordParseError(
      'malformed_csv',
      `${line === undefined ? 'The values' : `Line ${line}`} cannot be read as delimited text: ${(error as Error).message}`,
      line,
    )
  }
  for (const { record, info } of records) reader.addRow(record, first + info.lines)
  return reader.finish()
}

function statedOnce<T>(
  statements: readonly { value: T; line: number; text: string }[],
  same: (a: T, b: T) => boolean,
  code: RecordParseErrorCode,
  what: string,
): { value: T; line: number; text: string } | null {
  const [first, ...rest] = statements
  if (!first) return null
  for (const other of rest) {
    if (!same(first.value, other.value)) {
      throw new RecordParseError(
        code,
        `Line ${first.line} ("${first.text}") and line ${other.line} ("${other.text}") give different ${what}. Keep one.`,
        other.line,
      )
    }
  }
  return first
}

const sameDt = (a: number, b: number) => Math.abs(a - b) <= 1e-6 * Math.max(a, b)

function resolveUnits(statements: HeaderStatements, options: ParseRecordOptions, firstDataLine: number) {
  const stated = statedOnce(statements.units, (a, b) => a === b, 'units_conflict', 'units')
  if (options.units !== undefined) {
    if (stated && stated.value !== options.units) {
      throw new RecordParseError(
        'units_conflict',
        `Line ${stated.line} ("${stated.text}") states ${stated.value}, but ${options.units} was given. Give the units the file states, or correct the header.`,
        stated.line,
      )
    }
    return options.units
  }
  if (stated) return stated.value
  throw new RecordParseError(
    'units_missing',
    `The file does not state its units above the first value (line ${firstDataLine}). Choose g, m/s2, cm/s2 or in/s2, or add a header line such as "units: g".`,
    firstDataLine,
  )
}

function layout(rows: Rows, statements: HeaderStatements): RecordFormat {
  const statesLayout = statements.dtS.length > 0 || statements.points.length > 0
  let allOne = true
  let allTwo = true
  for (let row = 0; row < rows.rowCount; row++) {
    const count = rows.counts[row]
    if (count !== 1) allOne = false
    if (count !== 2) allTwo = false
  }
  if (allOne) return statesLayout ? 'headered' : 'single-column'
  if (allTwo) {
    if (!statesLayout) return 'time-value'
    const points = statements.points[0]?.value
    if (points === rows.rowCount) return 'time-value'
    if (points === rows.valueCount) return 'headered'
    const dt = statements.dtS[0]?.value
    const t0 = rows.values[0] ?? 0
    const t1 = rows.values[2] ?? 0
    const t2 = rows.values[4] ?? 0
    const looksLikeTime = dt !== undefined && sameStep(t1 - t0, dt) && sameStep(t2 - t1, dt)
    return looksLikeTime || dt === undefined ? 'time-value' : 'headered'
  }
  if (!statesLayout) {
    const expected = Math.min(rows.counts[0] ?? 1, 3)
    const row = expected > 2 ? 0 : rows.counts.findIndex((count) => count !== expected)
    const line = rows.lines[row] ?? 0
    const count = rows.counts[row] ?? 0
    throw new RecordParseError(
      'column_count',
      expected > 2
        ? `Line ${line} holds ${count} values. Without a header stating the time step, expected one column (acceleration) or two (time, acceleration).`
        : `Line ${line} holds ${count} value${count === 1 ? '' : 's'}, but the lines above hold ${expected}. Every line must have the same columns.`,
      line,
    )
  }
  return 'headered'
}

const sameStep = (a: number, b: number) => Math.abs(a - b) <= 1e-3 * Math.abs(b)

function timeValueSeries(rows: Rows): {
  accel: Float64Array
  dtS: number
  accelLines: Int32Array
  startS: number
} {
  const n = rows.rowCount
  for (let row = 0; row < n; row++) {
    if (rows.counts[row] !== 2) {
      const line = rows.lines[row] ?? 0
      throw new RecordParseError(
        'column_count',
        `Line ${line} holds ${rows.counts[row]} values; every line of a time-value file must hold two (time, acceleration).`,
        line,
      )
    }
  }
  const time = (row: number) => rows.values[2 * row] ?? NaN
  const dtS = n >= 2 ? (time(n - 1) - time(0)) / (n - 1) : NaN
  for (let row = 1; row < n; row++) {
    const step = time(row) - time(row - 1)
    const line = rows.lines[row] ?? 0
    if (!(step > 0)) {
      throw new RecordParseError(
        'time_not_increasing',
        `Line ${line}: time ${time(row)} does not increase from ${time(row - 1)} on the line before. Times must increase by a constant step.`,
        line,
      )
    }
    const rounding = Math.max(rows.firstQuantum[row] ?? 0, rows.firstQuantum[row - 1] ?? 0)
    if (Math.abs(step - dtS) > 1e-3 * dtS + rounding) {
      throw new RecordParseError(
        'time_not_uniform',
        `Line ${line}: the time step here is ${formatSeconds(step)} s but averages ${formatSeconds(dtS)} s over the record. Ordinate needs a constant time step; resample the record first.`,
        line,
      )
    }
  }
  // When times are printed as coarsely as the step itself, every single step passes the check
  // above, yet a record whose step changes part-way would have samples attributed to the wrong
  // instant. Measure each time's distance from the constant-step grid; where the step changes,
  // that distance peaks, so the farthest sample names the line.
  let farthestRow = 0
  let farthestS = 0
  for (let row = 1; row < n; row++) {
    const offS = Math.abs(time(row) - (time(0) + row * dtS))
    if (offS > farthestS) {
      farthestS = offS
      farthestRow = row
    }
  }
  const printing = (rows.firstQuantum[farthestRow] ?? 0) + (rows.firstQuantum[0] ?? 0)
  if (farthestS > 0.5 * dtS + printing) {
    const line = rows.lines[farthestRow] ?? 0
    throw new RecordParseError(
      'time_not_uniform',
      `Line ${line}: time ${time(farthestRow)} s is ${formatSeconds(farthestS)} s away from ${formatSeconds(time(0) + farthestRow * dtS)} s, where the record's average step of ${formatSeconds(dtS)} s puts it; the time step changes around this line. Ordinate needs a constant time step; resample the record first.`,
      line,
    )
  }
  const accel = new Float64Array(n)
  for (let row = 0; row < n; row++) accel[row] = rows.values[2 * row + 1] ?? NaN
  return { accel, dtS, accelLines: rows.lines, startS: time(0) }
}

function formatSeconds(value: number): string {
  return Number(value.toPrecision(6)).toString()
}

/** Line number of the i-th value when rows hold several values each. */
function lineOfValue(rows: Rows, index: number): number {
  let seen = 0
  for (let row = 0; row < rows.rowCount; row++) {
    seen += rows.counts[row] ?? 0
    if (index < seen) return rows.lines[row] ?? 0
  }
  return rows.lines[rows.rowCount - 1] ?? 0
}

/**
 * Parses record text. Throws {@link RecordParseError} (and nothing else) with
 * the offending line when the text cannot be trusted as a record.
 */
export function parseRecord(text: string, options: ParseRecordOptions = {}): ParsedRecord {
  checkOptions(options)
  // Text records never hold a NUL character; images, spreadsheets and archives almost always do.
  if (text.includes('\u0000')) {
    throw new RecordParseError(
      'not_text',
      'The file is not plain text (it holds binary bytes, as a spreadsheet, archive or image does). Save the record as text: CSV, or one value per line.',
    )
  }
  const lines = splitLines(text)
  const statements = emptyHeaderStatements()
  let first = -1
  for (let index = 0; index < lines.length; index++) {
    const line = lines[index] ?? ''
    if (isDataLine(line)) {
      first = index
      break
    }
    if (line.trim() !== '') readHeaderLine(line, index + 1, statements)
  }
  if (first < 0) {
    const blank = lines.every((line) => line.trim() === '')
    throw blank
      ? new RecordParseError('empty', 'The file is empty.')
      : new RecordParseError(
          'no_values',
          'No line holds only numbers. Expected accelerations (or time and acceleration) after any header lines.',
        )
  }
  const firstDataLine = first + 1
  const sourceUnits = resolveUnits(statements, options, firstDataLine)
  const statedDt = statedOnce(statements.dtS, sameDt, 'dt_conflict', 'time steps')
  const statedPoints = statedOnce(statements.points, (a, b) => a === b, 'points_mismatch', 'point counts')
  const rows = readRows(lines, first)
  const format = layout(rows, statements)
  const warnings: string[] = []

  let accel: Float64Array
  let dtS: number
  let lineOf: (index: number) => number
  if (format === 'time-value') {
    const series = timeValueSeries(rows)
    accel = series.accel
    lineOf = (index) => series.accelLines[index] ?? 0
    dtS = series.dtS
    const given = options.dtS ?? statedDt?.value
    if (given !== undefined && accel.length >= 2 && Math.abs(given - dtS) > 1e-3 * given) {
      const source =
        options.dtS !== undefined
          ? `The time step given (${given} s)`
          : `Line ${statedDt?.line} ("${statedDt?.text}")`
      throw new RecordParseError(
        'dt_conflict',
        `${source} disagrees with the time column from line ${firstDataLine}, which steps by ${formatSeconds(dtS)} s. Correct one of them.`,
        options.dtS !== undefined ? firstDataLine : statedDt?.line,
      )
    }
    if (Math.abs(series.startS) > 1e-3 * dtS + (rows.firstQuantum[0] ?? 0)) {
      warnings.push(
        `The time column starts at ${formatSeconds(series.startS)} s; the record is taken to start at its first sample.`,
      )
    }
  } else {
    accel = rows.values.slice()
    lineOf = (index) => (format === 'single-column' ? (rows.lines[index] ?? 0) : lineOfValue(rows, index))
    if (options.dtS !== undefined && statedDt && !sameDt(options.dtS, statedDt.value)) {
      throw new RecordParseError(
        'dt_conflict',
        `Line ${statedDt.line} ("${statedDt.text}") states a time step of ${statedDt.value} s, but ${options.dtS} s was given. Correct one of them.`,
        statedDt.line,
      )
    }
    const given = options.dtS ?? statedDt?.value
    if (given === undefined) {
      throw new RecordParseError(
        'dt_missing',
        `The file does not state its time step above the first value (line ${firstDataLine}). Give the time step in seconds, or add a header line such as "dt = 0.005 s".`,
        firstDataLine,
      )
    }
    dtS = given
  }

  const points = accel.length
  if (statedPoints && statedPoints.value !== points) {
    throw new RecordParseError(
      'points_mismatch',
      `Line ${statedPoints.line} ("${statedPoints.text}") states ${statedPoints.value} points, but the file holds ${points} (lines ${firstDataLine}–${rows.lines[rows.rowCount - 1]}). Check for a truncated or padded file.`,
      statedPoints.line,
    )
  }
  if (points > MAX_RECORD_POINTS) throw tooMany(lineOf(MAX_RECORD_POINTS))
  if (points < MIN_RECORD_POINTS) {
    const line = rows.lines[rows.rowCount - 1] ?? firstDataLine
    throw new RecordParseError(
      'too_few_points',
      `The record holds ${points} samples (ending at line ${line}); at least ${MIN_RECORD_POINTS} are needed for a spectrum.`,
      line,
    )
  }

  const scale = M_PER_S2_PER_UNIT[sourceUnits]
  const limit = MAX_PLAUSIBLE_ACCEL_G * STANDARD_GRAVITY_M_PER_S2
  let peak = 0
  for (let index = 0; index < points; index++) {
    const value = (accel[index] ?? 0) * scale
    if (Math.abs(value) > peak) peak = Math.abs(value)
    if (Math.abs(value) > limit) {
      const line = lineOf(index)
      throw new RecordParseError(
        'implausible_amplitude',
        `Line ${line}: ${accel[index]} ${sourceUnits} is ${(Math.abs(value) / STANDARD_GRAVITY_M_PER_S2).toPrecision(3)} g, above the ${MAX_PLAUSIBLE_ACCEL_G} g that any recorded ground motion reaches. Check the units.`,
        line,
      )
    }
    accel[index] = value
  }
  for (const w of unitPlausibilityWarnings(peak, sourceUnits, dtS)) warnings.push(w.message)
  return { accelMPerS2: accel, dtS, points, sourceUnits, format, warnings }
}

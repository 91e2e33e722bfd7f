/**
 * A user target spectrum from CSV text: one "period (s), Sa (g)" pair per row, periods strictly
 * increasing. A first row that is not numeric is taken as a header; `#` starts a comment.
 * Kept apart from targets.ts because csv-parse needs Node's Buffer (server side only).
 */
import { CsvError, type InfoRecord, parse } from 'csv-parse/sync'

/** A CSV that cannot be a target; `line` is 1-based in the uploaded text. */
export class TargetCsvError extends Error {
  constructor(
    message: string,
    readonly line?: number,
  ) {
    super(message)
    this.name = 'TargetCsvError'
  }
}

export const TARGET_CSV_MAX_ROWS = 5000

export interface UserTargetPoints {
  periodsS: number[]
  saG: number[]
}

/** What csv-parse returns per record with `info: true`. */
interface InfoRecordRow {
  record: string[]
  info: InfoRecord
}

function toNumber(text: string): number {
  return text.trim() === '' ? NaN : Number(text)
}

/** Parses and checks a target CSV; throws TargetCsvError naming the line at fault. */
export function parseTargetCsv(text: string): UserTargetPoints {
  let rows: InfoRecordRow[]
  try {
    rows = parse(text, {
      comment: '#',
      skip_empty_lines: true,
      relax_column_count: true,
      trim: true,
      info: true,
      delimiter: [',', ';', '\t'],
    }) as unknown as InfoRecordRow[]
  } catch (err) {
    if (err instanceof CsvError) {
      const line = (err as CsvError & { lines?: number }).lines
      throw new TargetCsvError(`The CSV could not be read: ${err.message}`, line)
    }
    throw err
  }
  const periodsS: number[] = []
  const saG: number[] = []
  rows.forEach(({ record, info }, index) => {
    const line = info.lines
    const [a = '', b = ''] = record
    const t = toNumber(a)
    const sa = toNumber(b)
    if (index === 0 && (Number.isNaN(t) || Number.isNaN(sa))) return // a header row
    if (record.length < 2)
      throw new TargetCsvError(`Line ${line}: expected two values, period (s) and Sa (g).`, line)
    if (!Number.isFinite(t) || !(t > 0)) {
      throw new TargetCsvError(`Line ${line}: the period "${a}" must be a positive number of seconds.`, line)
    }
    if (!Number.isFinite(sa) || !(sa > 0)) {
      throw new TargetCsvError(`Line ${line}: Sa "${b}" must be a positive number in g.`, line)
    }
    const previous = periodsS[periodsS.length - 1]
    if (previous !== undefined && !(t > previous)) {
      throw new TargetCsvError(`Line ${line}: periods must increase; ${t} s follows ${previous} s.`, line)
    }
    if (periodsS.length >= TARGET_CSV_MAX_ROWS) {
      throw new TargetCsvError(`Line ${line}: a target may have at most ${TARGET_CSV_MAX_ROWS} points.`, line)
    }
    periodsS.push(t)
    saG.push(sa)
  })
  if (periodsS.length < 2) throw new TargetCsvError('A target needs at least two rows of period (s), Sa (g).')
  return { periodsS, saG }
}

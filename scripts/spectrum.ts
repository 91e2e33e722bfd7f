/**
 * Command line: the response spectrum of one record file.
 *
 *   npm run spectrum -- <file> [--units g|m/s2|cm/s2|in/s2] [--dt SECONDS]
 *       [--damping 0.02,0.05] [--periods MIN:MAX:COUNT | --periods-file FILE]
 *       [--method newmark-average|newmark-linear|piecewise-exact] [--format csv|json]
 *
 * Prints only the result on stdout (JSON by default, SI units). Problems go to
 * stderr with the reason and the line, and the exit status is non-zero:
 * 1 when the record or periods file cannot be used, 2 for a bad command line.
 */
import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { basename } from 'node:path'
import { parseArgs } from 'node:util'
import { runOrdinatesCsv } from '../server/exports/ordinatesCsv.js'
import { ordinateVersion } from '../server/exports/sheetParts.js'
import { spectrumResultSchema } from '../shared/schemas/spectrum.js'
import { MAX_DAMPING_RATIO, computeSpectrum } from '../shared/spectra/computeSpectrum.js'
import { SPECTRUM_METHODS, type SpectrumMethod } from '../shared/spectra/oscillatorRecurrence.js'
import { RecordParseError, parseRecord } from '../shared/spectra/parseRecord.js'
import { defaultPeriodsS, logPeriodGrid } from '../shared/spectra/periods.js'
import { recordParameters, recordWarnings } from '../shared/spectra/recordParameters.js'
import { toSpectrumJson } from '../shared/spectra/toSpectrumJson.js'
import { SOURCE_UNITS, STANDARD_GRAVITY_M_PER_S2, isSourceUnits } from '../shared/spectra/units.js'
import type { SpectrumResult } from '../shared/schemas/spectrum.js'

const USAGE = `usage: npm run spectrum -- <file> [--units g|m/s2|cm/s2|in/s2] [--dt SECONDS]
    [--damping 0.02,0.05] [--periods MIN:MAX:COUNT | --periods-file FILE]
    [--method newmark-average|newmark-linear|piecewise-exact] [--format csv|json]`

/** A problem the user can fix; `exitCode` 2 means the command line itself. */
class CliError extends Error {
  constructor(
    message: string,
    readonly exitCode: 1 | 2,
  ) {
    super(message)
  }
}

const usageError = (message: string) => new CliError(`${message}\n${USAGE}`, 2)

function parseDamping(text: string): number[] {
  const values = text.split(',').map((part) => part.trim())
  return values.map((part) => {
    const value = Number(part)
    if (part === '' || !(value >= 0 && value < MAX_DAMPING_RATIO)) {
      throw usageError(
        `--damping: "${part}" is not a damping ratio in [0, ${MAX_DAMPING_RATIO}) (5% is 0.05).`,
      )
    }
    return value
  })
}

function parsePeriodGrid(text: string): number[] {
  const parts = text.split(':')
  const [min, max, count] = parts.map(Number)
  if (parts.length !== 3 || !(min! > 0 && max! > min! && Number.isInteger(count) && count! >= 2)) {
    throw usageError(
      `--periods: "${text}" should be MIN:MAX:COUNT with 0 < MIN < MAX and a whole COUNT ≥ 2, e.g. 0.01:10:301.`,
    )
  }
  return logPeriodGrid(min!, max!, count!)
}

/** One period per line, used exactly as given and in order; blank lines and # comments are skipped. */
function readPeriodsFile(path: string): number[] {
  const text = readText(path)
  const periods: number[] = []
  text.split(/\r\n|\r|\n/).forEach((raw, index) => {
    const line = raw.trim()
    if (line === '' || line.startsWith('#')) return
    const value = Number(line)
    if (!(Number.isFinite(value) && value > 0)) {
      throw new CliError(`${path}: line ${index + 1}: "${line}" is not a positive period in seconds.`, 1)
    }
    periods.push(value)
  })
  if (periods.length === 0) throw new CliError(`${path}: no periods found (one per line).`, 1)
  return periods
}

function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8')
  } catch (error) {
    throw new CliError(
      `${path}: cannot read the file (${(error as NodeJS.ErrnoException).code ?? 'error'}).`,
      1,
    )
  }
}

interface Options {
  file: string
  units?: (typeof SOURCE_UNITS)[number]
  dtS?: number
  dampingRatios: number[]
  periodsS: number[]
  method: SpectrumMethod
  format: 'csv' | 'json'
}

function readOptions(argv: string[]): Options {
  let parsed
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        units: { type: 'string' },
        dt: { type: 'string' },
        damping: { type: 'string', default: '0.05' },
        periods: { type: 'string' },
        'periods-file': { type: 'string' },
        method: { type: 'string', default: 'newmark-average' },
        format: { type: 'string', default: 'json' },
      },
    })
  } catch (error) {
    throw usageError((error as Error).message)
  }
  const { values, positionals } = parsed
  if (positionals.length !== 1) throw usageError('Give exactly one record file.')
  if (values.units !== undefined && !isSourceUnits(values.units)) {
    throw usageError(`--units: "${values.units}" is not one of ${SOURCE_UNITS.join(', ')}.`)
  }
  let dtS: number | undefined
  if (values.dt !== undefined) {
    dtS = Number(values.dt)
    if (!(Number.isFinite(dtS) && dtS > 0))
      throw usageError(`--dt: "${values.dt}" is not a positive time step in seconds.`)
  }
  if (!SPECTRUM_METHODS.includes(values.method as SpectrumMethod)) {
    throw usageError(`--method: "${values.method}" is not one of ${SPECTRUM_METHODS.join(', ')}.`)
  }
  if (values.format !== 'csv' && values.format !== 'json')
    throw usageError(`--format: "${values.format}" is not csv or json.`)
  if (values.periods !== undefined && values['periods-file'] !== undefined) {
    throw usageError('Give --periods or --periods-file, not both.')
  }
  const periodsS =
    values.periods !== undefined
      ? parsePeriodGrid(values.periods)
      : values['periods-file'] !== undefined
        ? readPeriodsFile(values['periods-file'])
        : defaultPeriodsS()
  return {
    file: positionals[0]!,
    units: values.units as Options['units'],
    dtS,
    dampingRatios: parseDamping(values.damping),
    periodsS,
    method: values.method as SpectrumMethod,
    format: values.format,
  }
}

/** The run CSV of the export and the API (server/exports/ordinatesCsv.ts), for one file. */
function csvText(result: SpectrumResult, fileName: string, sha256: string): string {
  return runOrdinatesCsv({
    about: [
      `Ordinate ${ordinateVersion()}`,
      `Elastic response spectrum of ${fileName}, computed on the command line`,
    ],
    records: [{ name: fileName, sha256, sourceUnits: result.record.sourceUnits }],
    spectrum: result,
    gravityMPerS2: STANDARD_GRAVITY_M_PER_S2,
  })
}

function run(argv: string[]): string {
  const options = readOptions(argv)
  const text = readText(options.file)
  let parsed
  try {
    parsed = parseRecord(text, { units: options.units, dtS: options.dtS })
  } catch (error) {
    if (error instanceof RecordParseError) {
      throw new CliError(
        `${options.file}${error.line === undefined ? '' : `:${error.line}`}: ${error.message} [${error.code}]`,
        1,
      )
    }
    throw error
  }
  const computation = computeSpectrum(parsed, {
    dampingRatios: options.dampingRatios,
    periodsS: options.periodsS,
    method: options.method,
  })
  const parameters = { ...recordParameters(parsed.accelMPerS2, parsed.dtS), sourceUnits: parsed.sourceUnits }
  const result = spectrumResultSchema.parse(
    toSpectrumJson(parameters, computation, [
      ...parsed.warnings,
      ...recordWarnings(parsed.accelMPerS2, parsed.dtS),
    ]),
  )
  if (options.format === 'json') return JSON.stringify(result) + '\n'
  return csvText(result, basename(options.file), createHash('sha256').update(text).digest('hex'))
}

// A reader that stops early (`| head`) is not an error.
process.stdout.on('error', (error: NodeJS.ErrnoException) => {
  if (error.code === 'EPIPE') process.exit(0)
  throw error
})

try {
  process.stdout.write(run(process.argv.slice(2)))
} catch (error) {
  if (error instanceof CliError) {
    process.stderr.write(`error: ${error.message}\n`)
    process.exitCode = error.exitCode
  } else {
    process.stderr.write(`error: ${(error as Error).stack ?? String(error)}\n`)
    process.exitCode = 1
  }
}

/**
 * Command line: the response spectrum of one record file.
 *
 *   npm run spectrum -- <file> [--units g|m/s2|cm/s2|in/s2] [--dt SECONDS]
 *       [--damping 0.02,0.05] [--periods MIN:MAX:COUNT | --periods-file FILE]
 *       [--method newmark-average|newmark-linear|piecewise-exact] [--format csv|json]
 *       [--baseline N] [--taper S] [--highpass HZ[:ORDER]] [--lowpass HZ[:ORDER]]
 *       [--phase zero|causal] [--pads keep|trim] [--fourier]
 *
 * The processing flags mean what they mean in the API (POST /api/records/:id/processed): a
 * baseline polynomial of order N, a cosine taper of S seconds at each end, Butterworth filters
 * (order 4 when not given), zero phase with kept pads by default. `--fourier` prints the Fourier
 * amplitude spectrum (of the processed record, when processing is asked for) instead of the
 * response spectrum.
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
import {
  type ProcessingSettingsBody,
  type RecordProcessing,
  processingSettingsSchema,
} from '../shared/schemas/processing.js'
import { spectrumResultSchema } from '../shared/schemas/spectrum.js'
import { usableBandCaution } from '../shared/spectra/processing/describeProcessing.js'
import { type FourierSpectrum, fourierSpectrum } from '../shared/spectra/processing/fourierSpectrum.js'
import { processRecord, processingIssues } from '../shared/spectra/processing/processRecord.js'
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
    [--method newmark-average|newmark-linear|piecewise-exact] [--format csv|json]
    [--baseline N] [--taper S] [--highpass HZ[:ORDER]] [--lowpass HZ[:ORDER]]
    [--phase zero|causal] [--pads keep|trim] [--fourier]`

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
  /** null when no processing flag is given. */
  processing: ProcessingSettingsBody | null
  fourier: boolean
}

const DEFAULT_FILTER_ORDER = 4

/** "HZ" or "HZ:ORDER" of --highpass and --lowpass. */
function parseFilter(flag: string, text: string | undefined): { hz: number; order: number } | undefined {
  if (text === undefined) return undefined
  const [hz, order, ...rest] = text.split(':')
  const filter = { hz: Number(hz), order: order === undefined ? DEFAULT_FILTER_ORDER : Number(order) }
  if (
    rest.length ||
    hz === '' ||
    order === '' ||
    !Number.isFinite(filter.hz) ||
    !Number.isFinite(filter.order)
  )
    throw usageError(`--${flag}: "${text}" should be HZ or HZ:ORDER, e.g. 0.1:4.`)
  return filter
}

const FLAG_OF_FIELD: Record<string, string> = {
  baseline: '--baseline',
  taperS: '--taper',
  highPass: '--highpass',
  lowPass: '--lowpass',
  phase: '--phase',
  pads: '--pads',
}

/** The processing flags as the API's settings, checked by the same schema; null without any. */
function readProcessing(values: Record<string, string | boolean | undefined>): ProcessingSettingsBody | null {
  const given = ['baseline', 'taper', 'highpass', 'lowpass', 'phase', 'pads'].some(
    (k) => values[k] !== undefined,
  )
  if (!given) return null
  const num = (v: string | boolean | undefined) => (typeof v === 'string' ? Number(v) : undefined)
  const body = {
    ...(values.baseline !== undefined ? { baseline: { order: num(values.baseline) } } : {}),
    ...(values.taper !== undefined ? { taperS: num(values.taper) } : {}),
    ...(values.highpass !== undefined
      ? { highPass: parseFilter('highpass', values.highpass as string) }
      : {}),
    ...(values.lowpass !== undefined ? { lowPass: parseFilter('lowpass', values.lowpass as string) } : {}),
    ...(values.phase !== undefined ? { phase: values.phase } : {}),
    ...(values.pads !== undefined ? { pads: values.pads } : {}),
  }
  const parsed = processingSettingsSchema.safeParse(body)
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!
    throw usageError(`${FLAG_OF_FIELD[String(issue.path[0])] ?? 'processing'}: ${issue.message}`)
  }
  return parsed.data
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
        baseline: { type: 'string' },
        taper: { type: 'string' },
        highpass: { type: 'string' },
        lowpass: { type: 'string' },
        phase: { type: 'string' },
        pads: { type: 'string' },
        fourier: { type: 'boolean', default: false },
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
    processing: readProcessing(values),
    fourier: values.fourier,
  }
}

/** The run CSV of the export and the API (server/exports/ordinatesCsv.ts), for one file. */
function csvText(
  result: SpectrumResult,
  fileName: string,
  sha256: string,
  processing: RecordProcessing | null,
): string {
  return runOrdinatesCsv({
    about: [
      `Ordinate ${ordinateVersion()}`,
      `Elastic response spectrum of ${fileName}, computed on the command line`,
    ],
    records: [{ name: fileName, sha256, sourceUnits: result.record.sourceUnits, processing }],
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
  const sha256 = createHash('sha256').update(text).digest('hex')
  let accelMPerS2 = parsed.accelMPerS2
  let processing: RecordProcessing | null = null
  const processingWarnings: string[] = []
  if (options.processing) {
    const issues = processingIssues(options.processing, accelMPerS2.length, parsed.dtS)
    if (issues.length > 0) {
      const issue = issues[0]!
      throw usageError(`${FLAG_OF_FIELD[issue.path[0]!] ?? 'processing'}: ${issue.message}`)
    }
    const processed = processRecord(accelMPerS2, parsed.dtS, options.processing)
    accelMPerS2 = processed.accelMPerS2
    const step = { ...processed.applied, sourceSha256: sha256 }
    processing = {
      ...step,
      parentSha256: sha256,
      usablePeriodMaxS: processed.usablePeriodMaxS,
      chain: [step],
    }
    processingWarnings.push(...processed.warnings)
  }
  if (options.fourier) return fourierText(fourierSpectrum(accelMPerS2, parsed.dtS), options.format)
  const computation = computeSpectrum(
    { accelMPerS2, dtS: parsed.dtS },
    { dampingRatios: options.dampingRatios, periodsS: options.periodsS, method: options.method },
  )
  const parameters = { ...recordParameters(accelMPerS2, parsed.dtS), sourceUnits: parsed.sourceUnits }
  const band = usableBandCaution(processing?.usablePeriodMaxS, Math.max(...options.periodsS))
  const result = spectrumResultSchema.parse(
    toSpectrumJson(parameters, computation, [
      ...parsed.warnings,
      ...processingWarnings,
      ...recordWarnings(accelMPerS2, parsed.dtS),
      ...(band ? [band] : []),
    ]),
  )
  if (options.format === 'json') return JSON.stringify(processing ? { ...result, processing } : result) + '\n'
  return csvText(result, basename(options.file), sha256, processing)
}

/** --fourier: the Fourier amplitude spectrum as JSON, or as CSV with one row per frequency. */
function fourierText(spectrum: FourierSpectrum, format: 'csv' | 'json'): string {
  const { frequencyHz, rawMPerS, smoothedMPerS } = spectrum
  if (format === 'json') {
    return (
      JSON.stringify({
        frequencyHz: Array.from(frequencyHz),
        rawMPerS: Array.from(rawMPerS),
        smoothedMPerS: Array.from(smoothedMPerS),
      }) + '\n'
    )
  }
  const rows = Array.from(frequencyHz, (f, i) => `${f},${rawMPerS[i]},${smoothedMPerS[i]}`)
  return (
    [
      '# Fourier amplitude spectrum Δt·|X(f)| in m/s: raw at the nearest FFT bin, smoothed with the Konno–Ohmachi window (b = 40)',
      'frequency_hz,raw_m_per_s,smoothed_m_per_s',
      ...rows,
    ].join('\n') + '\n'
  )
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

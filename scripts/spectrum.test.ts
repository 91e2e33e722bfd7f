import { execFile } from 'node:child_process'
import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'
import { describe, expect, it } from 'vitest'
import { readFileSync } from 'node:fs'
import { spectrumResultSchema } from '../shared/schemas/spectrum.js'
import { computeSpectrum } from '../shared/spectra/computeSpectrum.js'
import { parseRecord } from '../shared/spectra/parseRecord.js'
import { fourierSpectrum } from '../shared/spectra/processing/fourierSpectrum.js'
import { processRecord } from '../shared/spectra/processing/processRecord.js'

const run = promisify(execFile)
const root = fileURLToPath(new URL('..', import.meta.url))
const demo = join(root, 'shared/spectra/demo/synthetic-near-fault-pulse.csv')

async function cli(args: string[]): Promise<{ stdout: string; stderr: string; code: number }> {
  try {
    const { stdout, stderr } = await run(
      process.execPath,
      ['--import', 'tsx', 'scripts/spectrum.ts', ...args],
      { cwd: root },
    )
    return { stdout, stderr, code: 0 }
  } catch (error) {
    const failed = error as { stdout: string; stderr: string; code: number }
    return { stdout: failed.stdout, stderr: failed.stderr, code: failed.code }
  }
}

describe('npm run spectrum', () => {
  const scratch = mkdtempSync(join(tmpdir(), 'ordinate-cli-'))

  it('prints JSON that the spectrum schema accepts, with the periods and damping asked for', async () => {
    const { stdout, stderr, code } = await cli([
      demo,
      '--damping',
      '0.02,0.05',
      '--periods',
      '0.1:1:3',
      '--method',
      'piecewise-exact',
    ])
    expect(code).toBe(0)
    expect(stderr).toBe('')
    const result = spectrumResultSchema.parse(JSON.parse(stdout))
    expect(result.periodsS).toHaveLength(3)
    expect(result.periodsS[0]).toBe(0.1)
    expect(result.periodsS[2]).toBe(1)
    expect(result.curves.map((curve) => curve.dampingRatio)).toEqual([0.02, 0.05])
    expect(result.method).toBe('piecewise-exact')
    expect(result.record.points).toBe(4001)
  })

  it('uses a periods file exactly as given and prints the run CSV with the method statement and caution', async () => {
    const periodsFile = join(scratch, 'periods.txt')
    writeFileSync(periodsFile, '# periods\n2\n0.2\n\n0.5\n')
    const { stdout, code } = await cli([demo, '--periods-file', periodsFile, '--format', 'csv'])
    expect(code).toBe(0)
    const lines = stdout.trim().split('\r\n')
    expect(lines.some((line) => line.startsWith('# Caution: Ordinate is a calculation aid'))).toBe(true)
    expect(lines.some((line) => line.startsWith('# Solver: Newmark-β, average acceleration'))).toBe(true)
    const header = lines.findIndex((line) => line.startsWith('period_s,'))
    expect(lines[header]).toContain('psa_m_per_s2_zeta0.05')
    // The CSV of the exports: one row per period, ascending (the JSON keeps the file's order).
    expect(lines.slice(header + 1).map((line) => Number(line.split(',')[0]))).toEqual([0.2, 0.5, 2])
  })

  it('exits non-zero with the reason and the line on stderr for a bad record', async () => {
    const bad = join(scratch, 'bad.txt')
    writeFileSync(
      bad,
      ['dt = 0.01 s', 'units: g', ...Array.from({ length: 20 }, () => '0.1'), 'NaN', '0.1'].join('\n'),
    )
    const { stdout, stderr, code } = await cli([bad])
    expect(code).toBe(1)
    expect(stdout).toBe('')
    expect(stderr).toContain(':23:')
    expect(stderr).toContain('Line 23')
    expect(stderr).toContain('not_finite')
  })

  it('exits with status 2 and the usage for a bad command line', async () => {
    const { stderr, code } = await cli([demo, '--damping', '5'])
    expect(code).toBe(2)
    expect(stderr).toContain('--damping')
    expect(stderr).toContain('usage:')
  })

  it('with npm run --silent, prints only the result', async () => {
    const { stdout } = await run('npm', ['run', '--silent', 'spectrum', '--', demo, '--periods', '0.5:1:2'], {
      cwd: root,
    })
    expect(() => JSON.parse(stdout)).not.toThrow()
  })
  it("processes the record with the API's settings before the sweep, and states the chain", async () => {
    const { stdout, stderr, code } = await cli([
      demo,
      '--baseline',
      '1',
      '--highpass',
      '0.1:4',
      '--periods',
      '0.1:2:4',
      '--method',
      'piecewise-exact',
    ])
    expect(code).toBe(0)
    expect(stderr).toBe('')
    const printed = JSON.parse(stdout) as { processing: { chain: unknown[]; usablePeriodMaxS: number } }
    const result = spectrumResultSchema.parse(printed)
    expect(printed.processing.chain).toHaveLength(1)
    // The same steps in process: the shared processing and engine the API uses.
    const record = parseRecord(readFileSync(demo, 'utf8'))
    const processed = processRecord(record.accelMPerS2, record.dtS, {
      baseline: { order: 1 },
      highPass: { hz: 0.1, order: 4 },
    })
    expect(printed.processing.usablePeriodMaxS).toBe(processed.usablePeriodMaxS)
    const direct = computeSpectrum(
      { accelMPerS2: processed.accelMPerS2, dtS: record.dtS },
      { dampingRatios: [0.05], periodsS: result.periodsS, method: 'piecewise-exact' },
    )
    expect(result.curves[0]!.psaMPerS2).toEqual(Array.from(direct.curves[0]!.psaMPerS2))
    const plain = spectrumResultSchema.parse(JSON.parse((await cli([demo, '--periods', '0.1:2:4'])).stdout))
    expect(result.curves[0]!.psaMPerS2).not.toEqual(plain.curves[0]!.psaMPerS2)
  })

  it('prints the Fourier amplitude spectrum of the processed record with --fourier', async () => {
    const { stdout, code } = await cli([demo, '--highpass', '0.2', '--fourier'])
    expect(code).toBe(0)
    const printed = JSON.parse(stdout) as {
      frequencyHz: number[]
      rawMPerS: number[]
      smoothedMPerS: number[]
    }
    const record = parseRecord(readFileSync(demo, 'utf8'))
    const processed = processRecord(record.accelMPerS2, record.dtS, { highPass: { hz: 0.2, order: 4 } })
    const direct = fourierSpectrum(processed.accelMPerS2, record.dtS)
    expect(printed.frequencyHz).toEqual(Array.from(direct.frequencyHz))
    expect(printed.rawMPerS).toEqual(Array.from(direct.rawMPerS))
    expect(printed.smoothedMPerS).toHaveLength(printed.frequencyHz.length)
  })

  it('exits with status 2 naming the processing flag that is wrong', async () => {
    const { stderr, code } = await cli([demo, '--highpass', 'fast'])
    expect(code).toBe(2)
    expect(stderr).toContain('--highpass')
    expect(stderr).toContain('usage:')
  })
})

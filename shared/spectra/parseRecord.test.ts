import { describe, expect, it } from 'vitest'
import { MAX_RECORD_POINTS, RecordParseError, inspectRecordHeader, parseRecord } from './parseRecord.js'

const G = 9.80665 // standard gravity, m/s² (3rd CGPM, 1901)

/** Twenty samples of a ramp: 0.01, 0.02, … in whatever units the test states. */
const VALUES = Array.from({ length: 20 }, (_, i) => ((i + 1) / 100).toFixed(2))

function expectRejection(run: () => unknown, code: string, line?: number): RecordParseError {
  let caught: unknown
  try {
    run()
  } catch (error) {
    caught = error
  }
  expect(caught).toBeInstanceOf(RecordParseError)
  const error = caught as RecordParseError
  expect(error.code).toBe(code)
  expect(error.line).toBe(line)
  if (line !== undefined) expect(error.message).toContain(`ine ${line}`)
  return error
}

describe('parseRecord', () => {
  describe('a single column of accelerations', () => {
    it('reads values with units and time step from the caller, converting g to m/s²', () => {
      const record = parseRecord(VALUES.join('\n'), { units: 'g', dtS: 0.01 })
      expect(record.format).toBe('single-column')
      expect(record.points).toBe(20)
      expect(record.dtS).toBe(0.01)
      expect(record.sourceUnits).toBe('g')
      expect(record.accelMPerS2[0]).toBeCloseTo(0.01 * G, 12)
      expect(record.accelMPerS2[19]).toBeCloseTo(0.2 * G, 12)
      expect(record.warnings).toEqual([])
    })

    it('converts cm/s² and in/s² exactly (1 gal = 0.01 m/s², 1 in = 0.0254 m)', () => {
      expect(parseRecord(VALUES.join('\n'), { units: 'cm/s2', dtS: 0.01 }).accelMPerS2[9]).toBeCloseTo(
        0.001,
        15,
      )
      expect(parseRecord(VALUES.join('\n'), { units: 'in/s2', dtS: 0.01 }).accelMPerS2[9]).toBeCloseTo(
        0.00254,
        15,
      )
      expect(parseRecord(VALUES.join('\n'), { units: 'm/s2', dtS: 0.01 }).accelMPerS2[9]).toBe(0.1)
    })

    it('accepts a byte-order mark, CRLF and old-Mac CR line endings, and exponents', () => {
      const lf = parseRecord(VALUES.join('\n'), { units: 'g', dtS: 0.01 })
      const crlf = parseRecord('\uFEFF' + VALUES.join('\r\n') + '\r\n', { units: 'g', dtS: 0.01 })
      const cr = parseRecord(VALUES.join('\r'), { units: 'g', dtS: 0.01 })
      expect(crlf.accelMPerS2).toEqual(lf.accelMPerS2)
      expect(cr.accelMPerS2).toEqual(lf.accelMPerS2)
      const exponents = parseRecord(
        VALUES.map((v) => Number(v).toExponential(3).replace('e', 'D')).join('\n'),
        {
          units: 'g',
          dtS: 0.01,
        },
      )
      expect(exponents.accelMPerS2[4]).toBeCloseTo(0.05 * G, 12)
    })
  })

  describe('two columns, time and acceleration', () => {
    const rows = VALUES.map((v, i) => [(i * 0.005).toFixed(3), v])

    it('reads comma-separated values with a header row naming the units', () => {
      const text = 'Time (s), Acceleration (g)\n' + rows.map((r) => r.join(', ')).join('\n')
      const record = parseRecord(text)
      expect(record.format).toBe('time-value')
      expect(record.sourceUnits).toBe('g')
      expect(record.dtS).toBeCloseTo(0.005, 15)
      expect(record.points).toBe(20)
      expect(record.accelMPerS2[1]).toBeCloseTo(0.02 * G, 12)
    })

    it('reads quoted CSV fields and semicolons', () => {
      const quoted = rows.map(([t, a]) => `"${t}","${a}"`).join('\n')
      expect(parseRecord(quoted, { units: 'm/s2' }).accelMPerS2[2]).toBe(0.03)
      const semicolons = rows.map((r) => r.join(';')).join('\n')
      expect(parseRecord(semicolons, { units: 'm/s2' }).dtS).toBeCloseTo(0.005, 15)
    })

    it('reads tab- and space-separated values without a header', () => {
      const tabs = parseRecord(rows.map((r) => r.join('\t')).join('\n'), { units: 'cm/s2' })
      const spaces = parseRecord(rows.map((r) => `  ${r.join('    ')}`).join('\n'), { units: 'cm/s2' })
      expect(tabs.format).toBe('time-value')
      expect(spaces.accelMPerS2).toEqual(tabs.accelMPerS2)
    })

    it('accepts a time column rounded as printed, and warns when it does not start at zero', () => {
      // 1/150 s printed to four decimals: steps of 0.0066 and 0.0067 s.
      const text = VALUES.map((v, i) => `${(1 + i / 150).toFixed(4)},${v}`).join('\n')
      const record = parseRecord(text, { units: 'g' })
      expect(record.dtS).toBeCloseTo(1 / 150, 5)
      expect(record.warnings).toHaveLength(1)
      expect(record.warnings[0]).toContain('starts at 1 s')
    })
  })

  describe('headered multi-column text', () => {
    function headered(header: string[], perLine = 5, values = VALUES): string {
      const body: string[] = []
      for (let i = 0; i < values.length; i += perLine) body.push(values.slice(i, i + perLine).join('  '))
      return [...header, ...body].join('\n')
    }

    it('reads NPTS= and DT= … SEC with units of g, several values per line', () => {
      const text = headered([
        'Synthetic test record (synthetic)',
        'ACCELERATION TIME SERIES IN UNITS OF G',
        'NPTS=    20, DT= .0050 SEC',
      ])
      const record = parseRecord(text)
      expect(record.format).toBe('headered')
      expect(record.dtS).toBe(0.005)
      expect(record.sourceUnits).toBe('g')
      expect(record.accelMPerS2[19]).toBeCloseTo(0.2 * G, 12)
    })

    it('reads "points: N" and "dt = … s"', () => {
      const record = parseRecord(headered(['points: 20', 'dt = 0.01 s', 'units: cm/s^2'], 4))
      expect(record.dtS).toBe(0.01)
      expect(record.sourceUnits).toBe('cm/s2')
      expect(record.accelMPerS2[0]).toBeCloseTo(0.0001, 15)
    })

    it('reads a sampling rate in Hz and a time step in ms', () => {
      expect(parseRecord(headered(['sampling rate 200 Hz', 'Units: m/s2'])).dtS).toBe(0.005)
      expect(parseRecord(headered(['Time step: 5 ms', 'acceleration (in/s/s)'])).dtS).toBe(0.005)
    })

    it('reads a single column under a header that states the time step', () => {
      const record = parseRecord(headered(['DT=0.02', 'UNITS: gal'], 1))
      expect(record.format).toBe('headered')
      expect(record.sourceUnits).toBe('cm/s2')
      expect(record.dtS).toBe(0.02)
    })
  })

  describe('rejections, each naming the line', () => {
    it('rejects a non-numeric value', () => {
      const text = ['units: g', 'dt = 0.01', ...VALUES.slice(0, 10), '0.3 abc', ...VALUES.slice(10)].join(
        '\n',
      )
      const error = expectRejection(() => parseRecord(text), 'non_numeric', 13)
      expect(error.message).toContain('"abc"')
    })

    it('rejects an empty CSV field', () => {
      const text = VALUES.map((v, i) => (i === 5 ? `${i * 0.01},` : `${i * 0.01},${v}`)).join('\n')
      expectRejection(() => parseRecord(text, { units: 'g' }), 'non_numeric', 6)
    })

    it('rejects NaN and Infinity', () => {
      const withNaN = [...VALUES.slice(0, 7), 'NaN', ...VALUES.slice(7)].join('\n')
      expectRejection(() => parseRecord(withNaN, { units: 'g', dtS: 0.01 }), 'not_finite', 8)
      const withInfinity = ['-Infinity', ...VALUES].join('\n')
      expectRejection(() => parseRecord(withInfinity, { units: 'g', dtS: 0.01 }), 'not_finite', 1)
    })

    it('rejects time that decreases', () => {
      const text = VALUES.map((v, i) => `${(i === 9 ? 0.04 : i * 0.01).toFixed(2)},${v}`).join('\n')
      expectRejection(() => parseRecord(text, { units: 'g' }), 'time_not_increasing', 10)
    })

    it('rejects a non-uniform time step', () => {
      const text = VALUES.map((v, i) => `${(i < 12 ? i * 0.01 : i * 0.01 + 0.003).toFixed(3)},${v}`).join(
        '\n',
      )
      expectRejection(() => parseRecord(text, { units: 'g' }), 'time_not_uniform', 13)
    })

    it('rejects a point count that disagrees with the header', () => {
      const text = ['NPTS= 21, DT= 0.01 SEC', 'units: g', ...VALUES].join('\n')
      const error = expectRejection(() => parseRecord(text), 'points_mismatch', 1)
      expect(error.message).toContain('holds 20')
    })

    it('rejects fewer than 16 samples', () => {
      expectRejection(
        () => parseRecord(VALUES.slice(0, 15).join('\n'), { units: 'g', dtS: 0.01 }),
        'too_few_points',
        15,
      )
    })

    it('rejects more than 2,000,000 samples', () => {
      const text = '0\n'.repeat(MAX_RECORD_POINTS + 1)
      expectRejection(
        () => parseRecord(text, { units: 'g', dtS: 0.01 }),
        'too_many_points',
        MAX_RECORD_POINTS + 1,
      )
    })

    it('rejects |a| > 20 g after conversion, asking to check the units', () => {
      const text = [...VALUES.slice(0, 3), '250', ...VALUES.slice(3)].join('\n')
      const error = expectRejection(
        () => parseRecord(text, { units: 'm/s2', dtS: 0.01 }),
        'implausible_amplitude',
        4,
      )
      expect(error.message).toContain('Check the units')
      // The same number is plausible in cm/s² (0.25 g).
      expect(parseRecord(text, { units: 'cm/s2', dtS: 0.01 }).points).toBe(21)
    })

    it('rejects a missing time step where the file states none', () => {
      const error = expectRejection(() => parseRecord(['units: g', ...VALUES].join('\n')), 'dt_missing', 2)
      expect(error.message).toContain('time step')
    })

    it('rejects missing units where the file states none', () => {
      expectRejection(() => parseRecord(['dt = 0.01', ...VALUES].join('\n')), 'units_missing', 2)
    })

    it('rejects a time step or units given that contradict the file', () => {
      const text = ['dt = 0.01 s', 'units: g', ...VALUES].join('\n')
      expectRejection(() => parseRecord(text, { dtS: 0.02 }), 'dt_conflict', 1)
      expectRejection(() => parseRecord(text, { units: 'cm/s2' }), 'units_conflict', 2)
      const timed = VALUES.map((v, i) => `${i * 0.01},${v}`).join('\n')
      expectRejection(() => parseRecord(timed, { units: 'g', dtS: 0.02 }), 'dt_conflict', 1)
    })

    it('rejects three columns without a header, and a short row in a time-value file', () => {
      const three = VALUES.map((v, i) => `${i * 0.01},${v},${v}`).join('\n')
      expectRejection(() => parseRecord(three, { units: 'g' }), 'column_count', 1)
      const ragged = VALUES.map((v, i) => (i === 16 ? `${i * 0.01}` : `${i * 0.01} ${v}`)).join('\n')
      expectRejection(() => parseRecord(ragged, { units: 'g' }), 'column_count', 17)
    })

    it('rejects an unclosed quote, an empty file and a file with no values', () => {
      const text = VALUES.map((v, i) => (i === 3 ? `${i * 0.01},"${v}` : `${i * 0.01},${v}`)).join('\n')
      expect(expectRejection(() => parseRecord(text, { units: 'g' }), 'malformed_csv', 20).message).toContain(
        'Quote',
      )
      expectRejection(() => parseRecord('\n  \n'), 'empty')
      expectRejection(() => parseRecord('station: none\nno data'), 'no_values')
    })

    it('rejects invalid options', () => {
      expectRejection(() => parseRecord(VALUES.join('\n'), { units: 'g', dtS: -1 }), 'invalid_option')
      expectRejection(
        () => parseRecord(VALUES.join('\n'), { units: 'mm/s2' as unknown as 'g', dtS: 0.01 }),
        'invalid_option',
      )
    })
  })
})

describe('inspectRecordHeader', () => {
  it('reports units and time step stated in a header', () => {
    expect(inspectRecordHeader('NPTS= 20, DT= 0.005 SEC\nunits: g\n' + VALUES.join(' '))).toEqual({
      units: 'g',
      dtS: 0.005,
      dtSource: 'header',
      points: 20,
      format: 'headered',
    })
  })

  it('takes the time step from a time column', () => {
    const info = inspectRecordHeader('t,a\n0,0.1\n0.01,0.2\n0.02,0.3\n')
    expect(info.dtSource).toBe('time-column')
    expect(info.dtS).toBeCloseTo(0.01, 15)
    expect(info.units).toBeNull()
    expect(info.format).toBe('time-value')
  })

  it('reports nothing stated for a bare column, and never throws on junk', () => {
    expect(inspectRecordHeader(VALUES.join('\n'))).toEqual({
      units: null,
      dtS: null,
      dtSource: null,
      points: null,
      format: 'single-column',
    })
    expect(inspectRecordHeader('\u0000junk "unclosed').format).toBeNull()
  })
})

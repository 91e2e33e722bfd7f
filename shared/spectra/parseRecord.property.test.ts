import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  MAX_PLAUSIBLE_ACCEL_G,
  MIN_RECORD_POINTS,
  type ParseRecordOptions,
  RecordParseError,
  parseRecord,
} from './parseRecord.js'
import { SOURCE_UNITS, STANDARD_GRAVITY_M_PER_S2 } from './units.js'

/**
 * Property-based checks of the parser (fast-check): whatever text arrives, parseRecord either
 * answers a record Ordinate can trust or throws its own RecordParseError, never a TypeError or a
 * RangeError from deep inside. numRuns is kept modest so the suite stays fast; fast-check prints
 * the seed and the shrunk input of any failure.
 */
const RUNS = 300

/** The only outcomes allowed: a sound record, or a RecordParseError naming a line in the text. */
function parsesOrRefuses(text: string, options: ParseRecordOptions): void {
  let parsed
  try {
    parsed = parseRecord(text, options)
  } catch (err) {
    if (!(err instanceof RecordParseError)) throw err
    expect(err.message.length).toBeGreaterThan(10)
    if (err.line !== undefined) {
      expect(Number.isInteger(err.line)).toBe(true)
      expect(err.line).toBeGreaterThanOrEqual(1)
      // BOM and line endings as splitLines counts them.
      expect(err.line).toBeLessThanOrEqual(text.split(/\r\n|\r|\n/).length)
    }
    return
  }
  expect(parsed.points).toBe(parsed.accelMPerS2.length)
  expect(parsed.points).toBeGreaterThanOrEqual(MIN_RECORD_POINTS)
  expect(Number.isFinite(parsed.dtS) && parsed.dtS > 0).toBe(true)
  const limit = MAX_PLAUSIBLE_ACCEL_G * STANDARD_GRAVITY_M_PER_S2
  for (const a of parsed.accelMPerS2) expect(Number.isFinite(a) && Math.abs(a) <= limit).toBe(true)
}

const options: fc.Arbitrary<ParseRecordOptions> = fc.record(
  {
    units: fc.constantFrom(...SOURCE_UNITS),
    // Invalid steps too: the parser must refuse them with its own error.
    dtS: fc.oneof(
      fc.double({ min: 1e-4, max: 1, noNaN: true }),
      fc.constantFrom(0, -0.01, Number.NaN, Infinity),
    ),
  },
  { requiredKeys: [] },
)

/** Tokens a record file is made of, with the junk that real files carry. */
const token = fc.oneof(
  { weight: 8, arbitrary: fc.double({ min: -50, max: 50, noNaN: true }).map((v) => v.toString()) },
  {
    weight: 2,
    arbitrary: fc.double({ min: -1, max: 1, noNaN: true }).map((v) => v.toExponential(4).replace('e', 'D')),
  },
  {
    weight: 1,
    arbitrary: fc.constantFrom(
      'NaN',
      '-Infinity',
      'inf',
      '',
      '"0.01"',
      '"',
      '1e999',
      '0x1A',
      '1,5',
      '--1',
      '.',
      '+',
    ),
  },
  { weight: 1, arbitrary: fc.string({ maxLength: 6 }) },
)
const line = fc.oneof(
  {
    weight: 10,
    arbitrary: fc
      .array(token, { minLength: 1, maxLength: 3 })
      .chain((t) => fc.constantFrom(' ', ',', ';', '\t').map((sep) => t.join(sep))),
  },
  {
    weight: 1,
    arbitrary: fc.constantFrom(
      'units: g',
      'dt = 0.01 s',
      'NPTS= 20, DT= .005 SEC',
      'time (s),acceleration (g)',
      '# comment',
      'sampling rate 200 Hz',
      'points: 40',
    ),
  },
)
const recordLike = fc
  .tuple(fc.array(line, { minLength: 0, maxLength: 60 }), fc.constantFrom('\n', '\r\n', '\r'), fc.boolean())
  .map(([lines, eol, bom]) => (bom ? '\ufeff' : '') + lines.join(eol))

describe('parseRecord (property-based)', () => {
  it('throws nothing but RecordParseError on arbitrary text', () => {
    fc.assert(fc.property(fc.string({ unit: 'grapheme', maxLength: 400 }), options, parsesOrRefuses), {
      numRuns: RUNS,
    })
  })

  it('throws nothing but RecordParseError on arbitrary bytes read as UTF-8', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 400 }), options, (bytes, o) =>
        parsesOrRefuses(new TextDecoder().decode(bytes), o),
      ),
      { numRuns: RUNS },
    )
  })

  it('throws nothing but RecordParseError on text shaped like a record, junk included', () => {
    fc.assert(fc.property(recordLike, options, parsesOrRefuses), { numRuns: RUNS })
  })

  it('reads back exactly the values of a well-formed single column, in any line ending', () => {
    const column = fc.array(fc.double({ min: -1, max: 1, noNaN: true }), {
      minLength: MIN_RECORD_POINTS,
      maxLength: 200,
    })
    fc.assert(
      fc.property(column, fc.constantFrom('\n', '\r\n', '\r'), (values, eol) => {
        const parsed = parseRecord(values.map(String).join(eol), { units: 'm/s2', dtS: 0.01 })
        // The text holds what String() prints (shortest round-trip digits; -0 prints as 0).
        expect(Array.from(parsed.accelMPerS2)).toEqual(values.map((v) => Number(String(v))))
      }),
      { numRuns: 100 },
    )
  })
})

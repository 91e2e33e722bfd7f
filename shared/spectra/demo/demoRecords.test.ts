import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { parseRecord } from '../parseRecord.js'
import { integrateRecord, recordParameters, recordWarnings } from '../recordParameters.js'
import { DEMO_RECORD_IDS, demoRecords, mulberry32 } from './demoRecords.js'

describe('synthetic demo records', () => {
  const records = demoRecords()

  it('are three, labelled synthetic, the first being the standard job’s 8,001 points at Δt = 0.005 s', () => {
    expect(records.map((record) => record.id)).toEqual(DEMO_RECORD_IDS)
    expect(records).toHaveLength(3)
    for (const record of records) {
      expect(record.synthetic).toBe(true)
      expect(record.name.toLowerCase()).toContain('synthetic')
      expect(record.text.toLowerCase()).toContain('synthetic')
    }
    expect(records[0]!.points).toBe(8001)
    expect(records[0]!.dtS).toBe(0.005)
  })

  it('match the committed files (regenerate with npx tsx scripts/generateDemoRecords.ts)', () => {
    for (const record of records) {
      expect(readFileSync(new URL(`./${record.fileName}`, import.meta.url), 'utf8')).toBe(record.text)
    }
  })

  it('parse as stated, start and end at rest, and raise no record warnings', () => {
    for (const record of records) {
      const parsed = parseRecord(record.text)
      expect(parsed.points).toBe(record.points)
      expect(parsed.dtS).toBe(record.dtS)
      expect(recordWarnings(parsed.accelMPerS2, parsed.dtS)).toEqual([])
      const params = recordParameters(parsed.accelMPerS2, parsed.dtS)
      const { velMPerS, dispM } = integrateRecord(parsed.accelMPerS2, parsed.dtS)
      expect(Math.abs(velMPerS[velMPerS.length - 1]!)).toBeLessThan(0.02 * params.pgvMPerS)
      expect(Math.abs(dispM[dispM.length - 1]!)).toBeLessThan(0.1 * params.pgdM)
    }
  })

  it('are reproducible: the PRNG is seeded', () => {
    const a = mulberry32(5)
    const b = mulberry32(5)
    expect([a(), a(), a()]).toEqual([b(), b(), b()])
    expect(demoRecords()[1]!.text).toBe(records[1]!.text)
  })
})

import { createHash, randomUUID } from 'node:crypto'
import { count, eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { auditLog, records } from '../../server/db/schema.js'
import { decodeSamples, encodeSamples } from '../../server/services/sampleBlob.js'
import { processRecord } from '../../shared/spectra/processing/processRecord.js'
import { runOrdinatesCsv } from '../../server/exports/ordinatesCsv.js'
import { buildRunSheetFromFacts } from '../../server/exports/runSheet.js'
import { buildSpectrumChart } from '../../shared/charts/spectrumChart.js'
import { computeSpectrum } from '../../shared/spectra/computeSpectrum.js'
import { recordParameters } from '../../shared/spectra/recordParameters.js'
import { toSpectrumJson } from '../../shared/spectra/toSpectrumJson.js'
import { demoRunFacts } from '../support/sheetFixtures.js'
import { postRecord } from '../support/recordUploads.js'
import { createTestContext, signInDemoMembers, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let outsider: request.Agent

const DT_S = 0.01
const POINTS = 3001

/** A synthetic motion in m/s² with a pre-event offset and a linear drift, one value per line. */
function driftingRecord(): number[] {
  return Array.from({ length: POINTS }, (_, i) => {
    const t = i * DT_S
    const env = t < 2 ? 0 : t < 5 ? (t - 2) / 3 : Math.exp(-(t - 5) / 5)
    return (
      env * (1.4 * Math.sin(2 * Math.PI * 1.3 * t) + 0.6 * Math.sin(2 * Math.PI * 3.1 * t)) + 0.02 + 0.001 * t
    )
  })
}

async function uploadRecord(agent: request.Agent, values: number[], name = 'drifting'): Promise<string> {
  const res = await postRecord(agent, values.join('\n') + '\n', `${name}.txt`, {
    units: 'm/s2',
    dtS: DT_S,
    name,
  })
  if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body.id as string
}

const recordCount = () => ctx.db.select({ n: count() }).from(records).get()!.n
const storedSamples = (id: string) =>
  ctx.db.select({ samples: records.samples }).from(records).where(eq(records.id, id)).get()!.samples

/** A copy of a stored record with other samples, inserted directly (an upload of 1.6 M lines takes long). */
function insertCopy(id: string, accelMPerS2: Float64Array): string {
  const row = ctx.db.select().from(records).where(eq(records.id, id)).get()!
  const copyId = randomUUID()
  ctx.db
    .insert(records)
    .values({
      ...row,
      id: copyId,
      points: accelMPerS2.length,
      durationS: (accelMPerS2.length - 1) * DT_S,
      samples: encodeSamples(accelMPerS2),
    })
    .run()
  return copyId
}

const SETTINGS = {
  baseline: { order: 1 },
  taperS: 0.5,
  highPass: { hz: 0.2, order: 4 },
  lowPass: { hz: 20, order: 4 },
}

let parentId: string

beforeAll(async () => {
  ctx = await createTestContext()
  ;({ engineer, checker, admin, outsider } = await signInDemoMembers(ctx))
  parentId = await uploadRecord(engineer, driftingRecord())
})
afterAll(() => ctx.close())

describe('POST /api/records/:id/processing/preview', () => {
  it('answers before and after histories, Fourier spectra, the gain, parameters and the usable band, storing nothing', async () => {
    const before = recordCount()
    const res = await checker.post(`/api/records/${parentId}/processing/preview`).send(SETTINGS)
    expect(res.status).toBe(200)
    expect(recordCount()).toBe(before)
    const b = res.body
    // Pads: 0.75·n/f_c = 0.75·4/0.2 = 15 s at each end (Converse & Brady 1992 via Boore 2005).
    expect(b.applied).toMatchObject({ phase: 'zero', pads: 'keep', padS: 15 })
    expect(b.after.histories.timeS[0]).toBeCloseTo(-15, 9)
    expect(b.before.histories.timeS[0]).toBe(0)
    expect(b.usablePeriodMaxS).toBeCloseTo(1 / (1.25 * 0.2), 12)
    for (const side of [b.before, b.after]) {
      expect(side.fourier.frequencyHz).toHaveLength(200)
      expect(side.fourier.rawMPerS).toHaveLength(200)
      expect(side.fourier.smoothedMPerS).toHaveLength(200)
      expect(side.fourier.frequencyHz.at(-1)).toBeCloseTo(50, 9)
    }
    expect(b.gain.gain).toHaveLength(200)
    // Zero-phase gain at the high-pass corner: |H|² ≈ 1/2 there, times the low-pass ≈ 1.
    const i = b.gain.frequencyHz.findIndex((f: number) => f > 0.2)
    expect(b.gain.gain[i]).toBeGreaterThan(0.4)
    expect(b.gain.gain[i]).toBeLessThan(0.7)
    expect(b.after.parameters.points).toBe(POINTS + 3000)
    // The drift: integrated displacement ends far from zero before, near zero after.
    expect(Math.abs(b.before.parameters.finalDispM)).toBeGreaterThan(0.5 * b.before.parameters.pgdM)
    expect(Math.abs(b.after.parameters.finalDispM)).toBeLessThan(0.01 * b.after.parameters.pgdM)
    expect(b.before.warnings.some((w: string) => /baseline/.test(w))).toBe(true)
  })

  it('is refused to an admin without an engineer or checker role, and 404 for another firm', async () => {
    expect((await admin.post(`/api/records/${parentId}/processing/preview`).send(SETTINGS)).status).toBe(403)
    expect((await outsider.post(`/api/records/${parentId}/processing/preview`).send(SETTINGS)).status).toBe(
      404,
    )
  })
})

describe('refusals', () => {
  const nyquist = 1 / (2 * DT_S)
  const cases: [string, Record<string, unknown>, string][] = [
    ['a low-pass at Nyquist', { lowPass: { hz: nyquist, order: 4 } }, 'lowPass.hz'],
    ['a low-pass above Nyquist', { lowPass: { hz: 70, order: 4 } }, 'lowPass.hz'],
    [
      'a high-pass at the low-pass',
      { highPass: { hz: 5, order: 4 }, lowPass: { hz: 5, order: 4 } },
      'highPass.hz',
    ],
    [
      'a high-pass above the low-pass',
      { highPass: { hz: 8, order: 4 }, lowPass: { hz: 5, order: 4 } },
      'highPass.hz',
    ],
    ['a filter order of 0', { highPass: { hz: 0.1, order: 0 } }, 'highPass.order'],
    ['a filter order of 9', { lowPass: { hz: 10, order: 9 } }, 'lowPass.order'],
    ['a fractional filter order', { lowPass: { hz: 10, order: 2.5 } }, 'lowPass.order'],
    ['a baseline order of 4', { baseline: { order: 4 } }, 'baseline.order'],
    ['a baseline order of −1', { baseline: { order: -1 } }, 'baseline.order'],
    ['a taper over a quarter of the record', { taperS: 7.6 }, 'taperS'],
    ['a negative taper', { taperS: -1 }, 'taperS'],
    ['pads on a causal filter', { highPass: { hz: 0.2, order: 2 }, phase: 'causal', pads: 'keep' }, 'pads'],
    ['an unknown phase', { phase: 'sideways' }, 'phase'],
    ['an unknown field', { detrend: true }, ''],
  ]
  for (const [what, body, field] of cases) {
    for (const route of ['processing/preview', 'processed'] as const) {
      it(`POST …/${route} with ${what} responds 400 naming ${field || 'the field'}, storing nothing`, async () => {
        const before = recordCount()
        const res = await engineer.post(`/api/records/${parentId}/${route}`).send(body)
        expect(res.status).toBe(400)
        const paths = (res.body.error.issues as { path: string[] }[]).map((i) => i.path.join('.'))
        if (field) expect(paths).toContain(field)
        else expect(res.body.error.message).toMatch(/detrend/)
        expect(recordCount()).toBe(before)
      })
    }
  }

  it('refuses a result over 2,000,000 points, pads included, naming the corner and storing nothing', async () => {
    // Pads of 0.75·8/0.0025 = 2400 s = 240,000 samples each end on a 1,600,000-point record.
    const longId = insertCopy(
      parentId,
      Float64Array.from({ length: 1_600_000 }, (_, i) => Math.sin(i / 50)),
    )
    const before = recordCount()
    const res = await engineer
      .post(`/api/records/${longId}/processed`)
      .send({ highPass: { hz: 0.0025, order: 8 } })
    expect(res.status).toBe(400)
    expect(res.body.error.issues[0].path).toEqual(['highPass', 'hz'])
    expect(res.body.error.message).toMatch(/2,000,000/)
    expect(recordCount()).toBe(before)
  })
})

describe('POST /api/records/:id/processed', () => {
  let childId: string

  it('stores the processed record as a child in SI with its kept pads, hashing its stored samples', async () => {
    const parentBytes = Buffer.from(storedSamples(parentId))
    const res = await engineer
      .post(`/api/records/${parentId}/processed`)
      .send({ ...SETTINGS, name: 'Corrected' })
    expect(res.status).toBe(201)
    childId = res.body.id
    expect(res.body).toMatchObject({
      name: 'Corrected',
      parentId,
      sourceUnits: 'm/s2',
      points: POINTS + 3000,
      children: [],
      processing: {
        baseline: { order: 1 },
        taperS: 0.5,
        highPass: { hz: 0.2, order: 4 },
        lowPass: { hz: 20, order: 4 },
        phase: 'zero',
        pads: 'keep',
        padS: 15,
      },
    })
    const stored = storedSamples(childId)
    expect(res.body.sha256).toBe(createHash('sha256').update(stored).digest('hex'))
    // The stored samples are the engine's result on the parent's samples, bit for bit.
    const expected = processRecord(decodeSamples(parentBytes), DT_S, SETTINGS).accelMPerS2
    expect(decodeSamples(stored)).toEqual(expected)
    // The original is never changed.
    expect(Buffer.from(storedSamples(parentId)).equals(parentBytes)).toBe(true)
    expect(res.body.durationS).toBeCloseTo((POINTS + 3000 - 1) * DT_S, 9)
    const audit = ctx.db.select().from(auditLog).where(eq(auditLog.subjectId, childId)).all()
    expect(audit.map((a) => a.action)).toEqual(['record.processed'])
  })

  it('shows the lineage both ways in GET /api/records/:id', async () => {
    const parent = await engineer.get(`/api/records/${parentId}`)
    expect(parent.body.children.map((c: { id: string }) => c.id)).toEqual([childId])
    expect(parent.body.parentId).toBeNull()
    expect(parent.body.processing).toBeNull()
    const child = await engineer.get(`/api/records/${childId}`)
    expect(child.body.parentId).toBe(parentId)
  })

  it('processes a processed record again and carries the chain, oldest first', async () => {
    const parentSha = (await engineer.get(`/api/records/${parentId}`)).body.sha256
    const childSha = (await engineer.get(`/api/records/${childId}`)).body.sha256
    const res = await engineer
      .post(`/api/records/${childId}/processed`)
      .send({ lowPass: { hz: 10, order: 2 }, phase: 'causal' })
    expect(res.status).toBe(201)
    const p = res.body.processing
    expect(p.parentSha256).toBe(childSha)
    expect(p.chain).toHaveLength(2)
    expect(p.chain[0].sourceSha256).toBe(parentSha)
    expect(p.chain[1]).toMatchObject({ lowPass: { hz: 10, order: 2 }, phase: 'causal', pads: null, padS: 0 })
    // The band of the chain is the first step's high-pass.
    expect(p.usablePeriodMaxS).toBeCloseTo(4, 12)
    expect(res.body.points).toBe(POINTS + 3000)
  })

  it('trims the pads when asked, with a warning saying why that is unwise', async () => {
    const res = await engineer
      .post(`/api/records/${parentId}/processed`)
      .send({ highPass: { hz: 0.2, order: 4 }, pads: 'trim' })
    expect(res.status).toBe(201)
    expect(res.body.points).toBe(POINTS)
    expect(res.body.processing.pads).toBe('trim')
    expect(res.body.warnings.some((w: string) => /Boore 2005/.test(w))).toBe(true)
  })

  it('refuses to delete a record while processed records made from it exist (409)', async () => {
    const res = await engineer.delete(`/api/records/${parentId}`)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('record_has_children')
    expect((await engineer.get(`/api/records/${parentId}`)).status).toBe(200)
  })
})

describe('GET /api/records/:id/fourier', () => {
  it('answers the raw and smoothed Fourier spectrum at 200 frequencies from 1/duration to Nyquist', async () => {
    const res = await checker.get(`/api/records/${parentId}/fourier`)
    expect(res.status).toBe(200)
    expect(res.body.frequencyHz).toHaveLength(200)
    expect(res.body.frequencyHz[0]).toBeCloseTo(1 / ((POINTS - 1) * DT_S), 9)
    expect(res.body.smoothedMPerS.every((v: number) => v >= 0)).toBe(true)
  })
})

describe('GET /api/records/:id/samples', () => {
  it('answers every sample unthinned when maxPoints ≥ points', async () => {
    const res = await engineer.get(`/api/records/${parentId}/samples?maxPoints=${POINTS}`)
    expect(res.status).toBe(200)
    expect(res.body.accelMPerS2).toHaveLength(POINTS)
    expect(res.body.accelMPerS2).toEqual(Array.from(decodeSamples(storedSamples(parentId))))
  })
})

describe('runs on a processed record', () => {
  it('state the processing chain and the usable-band caution in the CSV header, the method block and the sheet', async () => {
    const res = await engineer.post(`/api/records/${parentId}/processed`).send(SETTINGS)
    expect(res.status).toBe(201)
    const child = res.body
    const accel = decodeSamples(storedSamples(child.id))
    const periodsS = [0.1, 1, 2, 5, 8]
    const computation = computeSpectrum(
      { accelMPerS2: accel, dtS: DT_S },
      { dampingRatios: [0.05], periodsS, method: 'newmark-average' },
    )
    const spectrum = toSpectrumJson(
      { ...recordParameters(accel, DT_S), sourceUnits: 'm/s2' },
      computation,
      [],
    )
    const csv = runOrdinatesCsv({ about: [], records: [child], spectrum, gravityMPerS2: 9.80665 })
    const parentSha = (await engineer.get(`/api/records/${parentId}`)).body.sha256
    expect(csv).toMatch(
      new RegExp(`# Processing: Processed by Ordinate from the original \\(SHA-256 ${parentSha}`),
    )
    expect(csv).toMatch(/Butterworth high-pass 0\.2 Hz order 4, then low-pass 20 Hz order 4 \(zero phase/)
    expect(csv).toMatch(/zero pads of 15 s at each end kept with the record/)
    // 1/(1.25·0.2 Hz) = 4 s; the run goes to 8 s.
    expect(csv).toMatch(/# Warning: The record was high-pass filtered: ordinates at periods beyond 4 s/)

    const facts = demoRunFacts()
    facts.records = [{ ...facts.records[0]!, processing: child.processing }]
    const sheet = buildRunSheetFromFacts(facts)
    expect(sheet.method.find((f) => f.label === 'Record processing')?.value).toMatch(/high-pass 0\.2 Hz/)
    expect(sheet.records[0]!.fields.find((f) => f.label === 'Processing')?.value).toMatch(
      /least-squares baseline of order 1/,
    )
    expect(sheet.warnings.some((w) => /beyond 4 s/.test(w))).toBe(true)
    // The chart shades the periods beyond the usable band.
    expect(sheet.chart.options.usablePeriodMaxS).toBeCloseTo(4, 12)
    // The processed record's hash is of its samples, not of a file.
    const hashes = sheet.records[0]!.fields.filter((f) => f.label.startsWith('SHA-256'))
    expect(hashes.map((f) => f.label)).toEqual(['SHA-256 of the processed samples'])
    expect(buildSpectrumChart(sheet.chart.data, sheet.chart.options).svg).toContain(
      'data-role="outside-usable-band"',
    )
  })

  it('say no baseline correction or filtering was applied to a record as received', () => {
    const sheet = buildRunSheetFromFacts(demoRunFacts())
    expect(sheet.records[0]!.fields.some((f) => f.label === 'SHA-256 of the file')).toBe(true)
    expect(sheet.records[0]!.fields.find((f) => f.label === 'Processing')?.value).toMatch(
      /no baseline correction or filtering/,
    )
    expect(sheet.method.some((f) => f.label === 'Record processing')).toBe(false)
    expect(sheet.warnings.some((w) => /usable band/.test(w))).toBe(false)
    expect(sheet.chart.options.usablePeriodMaxS).toBeUndefined()
  })
})
